/**
 * Offline checks of the add-in manifest against the rules of Microsoft's add-in-only (XML) manifest
 * schema, as far as this add-in uses it. The rules come from the schema files Microsoft publishes
 * (OfficeAppManifestV1_1.xsd, TaskPaneAppVersionOverridesV1_0.xsd, OfficeAppBasicTypesV1_0.xsd) and
 * the reference pages named beside each rule. This is not a full schema validation (Microsoft's
 * validator is an online service); it checks, without a network:
 * - the root element, its namespaces and add-in type;
 * - element order and required children, for every element this manifest uses ("How to find the
 *   proper order of manifest elements": children must follow the schema's sequence);
 * - the value types: the add-in id is a GUID, the version has one to four parts of up to five digits,
 *   the locale is a culture name, short strings 1–125 characters, long strings 1–250, URLs at most
 *   2048 characters, permissions from the schema's list;
 * - every URL is https and under the host the manifest is made for ("Resources element": SSL for all
 *   URLs in Image and Url elements);
 * - resource ids are unique and at most 32 characters, and every resid names a resource of the right
 *   kind (an image for an icon, a URL for a location, a short string for a label or title, a long
 *   string for a description);
 * - control and group ids are unique short strings;
 * - icons: every Icon has the 16, 32 and 80 pixel images ("Icon element"), and each image file is a
 *   PNG of the size it is declared as: IconUrl 32 × 32 ("IconUrl element"), HighResolutionIconUrl
 *   64 × 64 ("HighResolutionIconUrl element").
 */
import { parseXml, type XmlElement } from './xml.js';

export interface ManifestCheckOptions {
  /** the https address every URL must start with, ending in "/" */
  base: string;
  /** the file a URL under base names (its path after base), to check icons; undefined when not at hand */
  file?: (path: string) => Uint8Array | undefined;
}

const NS = {
  app: 'http://schemas.microsoft.com/office/appforoffice/1.1',
  xsi: 'http://www.w3.org/2001/XMLSchema-instance',
  bt: 'http://schemas.microsoft.com/office/officeappbasictypes/1.0',
  overrides: 'http://schemas.microsoft.com/office/taskpaneappversionoverrides',
};
const UUID = /^(urn:uuid:)?[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}$|^\{[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}\}$/;
const VERSION = /^[0-9]{1,5}(\.[0-9]{1,5}){0,3}$/;
const SHORT_VERSION = /^[0-9]{1,5}\.[0-9]{1,5}$/;
const CULTURE = /^([a-zA-Z]{2,3}-[a-zA-Z0-9]{3,8}(-[a-zA-Z]{2,3})?|[a-zA-Z]{2,3}(-[a-zA-Z]{2,3}(_tradnl|\.pseudo|-[a-zA-Z]{4,8})?)?)$/;
const PERMISSIONS = ['Restricted', 'ReadDocument', 'ReadAllDocument', 'WriteDocument', 'ReadWriteDocument'];
const REQUIRED_ICON_SIZES = [16, 32, 80];
const OPTIONAL_ICON_SIZES = [20, 24, 40, 48, 64];
const MAX_RESOURCE_ID = 32;

type Slot = [name: string, min: number, max: number];
type Kind = 'image' | 'url' | 'short' | 'long';

class Checker {
  readonly problems: string[] = [];
  readonly resources = new Map<string, { kind: Kind; value: string; line: number }>();
  readonly references: { resid: string; kind: Kind; el: XmlElement; size?: number }[] = [];
  readonly controlIds = new Map<string, number>();

  constructor(readonly opts: ManifestCheckOptions) {}

  fail(el: XmlElement, message: string) { this.problems.push(`line ${el.line}: ${message}`); }

  /** Children of `el` follow the schema's sequence; returns the children by local name. */
  sequence(el: XmlElement, slots: Slot[]): Map<string, XmlElement[]> {
    const found = new Map<string, XmlElement[]>();
    let at = 0;
    for (const child of el.children) {
      let j = at;
      while (j < slots.length && slots[j][0] !== child.local) j++;
      if (j === slots.length) {
        const earlier = slots.findIndex((s) => s[0] === child.local);
        this.fail(child, earlier >= 0
          ? `<${child.name}> is out of order in <${el.name}>: it must come before <${slots[at][0]}>`
          : `<${child.name}> is not a valid child of <${el.name}>`);
        continue;
      }
      at = j;
      found.set(child.local, [...(found.get(child.local) ?? []), child]);
    }
    for (const [name, min, max] of slots) {
      const n = found.get(name)?.length ?? 0;
      if (n < min) this.fail(el, `<${el.name}> must contain <${name}>`);
      if (n > max) this.fail(el, `<${el.name}> may contain <${name}> at most ${max === 1 ? 'once' : `${max} times`}`);
    }
    return found;
  }

  one(found: Map<string, XmlElement[]>, name: string): XmlElement | undefined { return found.get(name)?.[0]; }

  attr(el: XmlElement, name: string): string | undefined {
    const v = el.attrs[name];
    if (v === undefined) this.fail(el, `<${el.name}> needs the attribute ${name}`);
    return v;
  }

  string(el: XmlElement, value: string | undefined, what: string, max: number) {
    if (value === undefined) return;
    if (value.length < 1 || value.length > max) this.fail(el, `${what} must have 1 to ${max} characters (it has ${value.length})`);
  }

  url(el: XmlElement, value: string | undefined, what: string) {
    if (value === undefined) return;
    if (value.length > 2048) this.fail(el, `${what} is longer than 2048 characters`);
    if (!value.startsWith('https://')) this.fail(el, `${what} must be an https address (${value})`);
    else if (!value.startsWith(this.opts.base)) this.fail(el, `${what} is not under ${this.opts.base} (${value})`);
  }

  /** A locale-aware setting: DefaultValue of the given type. */
  setting(el: XmlElement | undefined, kind: 'short' | 'long' | 'url', what: string): string | undefined {
    if (!el) return undefined;
    const v = this.attr(el, 'DefaultValue');
    if (kind === 'url') this.url(el, v, what);
    else this.string(el, v, what, kind === 'short' ? 125 : 250);
    return v;
  }

  ref(el: XmlElement | undefined, kind: Kind, size?: number) {
    if (!el) return;
    const resid = this.attr(el, 'resid');
    if (resid === undefined) return;
    if (resid.length > MAX_RESOURCE_ID) this.fail(el, `resid "${resid}" is longer than ${MAX_RESOURCE_ID} characters`);
    this.references.push({ resid, kind, el, size });
  }

  control(el: XmlElement, what: string) {
    const id = this.attr(el, 'id');
    this.string(el, id, `the ${what} id`, 125);
    if (id === undefined) return;
    if (this.controlIds.has(id)) this.fail(el, `the id "${id}" is used twice (also on line ${this.controlIds.get(id)})`);
    this.controlIds.set(id, el.line);
  }

  icon(el: XmlElement | undefined) {
    if (!el) return;
    const images = this.sequence(el, [['Image', 1, Infinity]]).get('Image') ?? [];
    const sizes = new Set<number>();
    for (const im of images) {
      const size = Number(this.attr(im, 'size'));
      if (![...REQUIRED_ICON_SIZES, ...OPTIONAL_ICON_SIZES].includes(size)) this.fail(im, `an icon image of size ${im.attrs.size} is not one Office uses`);
      sizes.add(size);
      this.ref(im, 'image', size);
    }
    for (const s of REQUIRED_ICON_SIZES) if (!sizes.has(s)) this.fail(el, `<Icon> must have a ${s} × ${s} image`);
  }

  /** The PNG a URL under base names is size × size pixels. */
  picture(el: XmlElement, url: string | undefined, size: number) {
    if (!url || !this.opts.file || !url.startsWith(this.opts.base)) return;
    const path = url.slice(this.opts.base.length);
    const bytes = this.opts.file(path);
    if (!bytes) { this.fail(el, `the image ${path} is not in the build`); return; }
    const png = pngSize(bytes);
    if (!png) this.fail(el, `the image ${path} is not a PNG file`);
    else if (png.width !== size || png.height !== size) this.fail(el, `the image ${path} is ${png.width} × ${png.height} pixels; it must be ${size} × ${size}`);
  }
}

/** Width and height from a PNG's IHDR chunk (PNG specification, sections 5.2 and 11.2.2). */
export function pngSize(bytes: Uint8Array): { width: number; height: number } | null {
  const signature = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (bytes.length < 24 || signature.some((b, i) => bytes[i] !== b)) return null;
  if (String.fromCharCode(...bytes.subarray(12, 16)) !== 'IHDR') return null;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return { width: view.getUint32(16), height: view.getUint32(20) };
}

function checkOverrides(c: Checker, vo: XmlElement) {
  if (vo.attrs.xmlns !== NS.overrides) c.fail(vo, `<VersionOverrides> must use the namespace ${NS.overrides}`);
  if (vo.attrs['xsi:type'] !== 'VersionOverridesV1_0') c.fail(vo, '<VersionOverrides> must be of xsi:type VersionOverridesV1_0');
  const parts = c.sequence(vo, [['Description', 0, 1], ['Requirements', 0, 1], ['Hosts', 0, 1], ['Resources', 0, 1], ['WebApplicationInfo', 0, 1], ['EquivalentAddins', 0, 1], ['VersionOverrides', 0, 1]]);
  c.ref(c.one(parts, 'Description'), 'long');
  const hosts = c.one(parts, 'Hosts');
  for (const host of hosts ? c.sequence(hosts, [['Host', 1, Infinity]]).get('Host') ?? [] : []) {
    if (host.attrs['xsi:type'] !== 'Workbook') c.fail(host, 'this add-in is for Excel: the host must be of xsi:type Workbook');
    const h = c.sequence(host, [['Runtimes', 0, 1], ['AllFormFactors', 0, 1], ['DesktopFormFactor', 0, 1], ['MobileFormFactor', 0, 1]]);
    const runtimes = c.one(h, 'Runtimes');
    if (runtimes) {
      // "Runtimes element": at present only one Runtime may be defined
      for (const rt of c.sequence(runtimes, [['Runtime', 1, 1]]).get('Runtime') ?? []) {
        c.ref(rt, 'url');
        if (rt.attrs.lifetime !== undefined && rt.attrs.lifetime !== 'long' && rt.attrs.lifetime !== 'short') c.fail(rt, 'lifetime must be "long" or "short"');
      }
    }
    const all = c.one(h, 'AllFormFactors');
    if (all) {
      for (const ep of c.sequence(all, [['ExtensionPoint', 0, 1]]).get('ExtensionPoint') ?? []) {
        if (ep.attrs['xsi:type'] !== 'CustomFunctions') c.fail(ep, 'the extension point for all form factors must be of xsi:type CustomFunctions');
        const f = c.sequence(ep, [['Script', 1, 1], ['Page', 1, 1], ['Metadata', 0, 1], ['Namespace', 0, 1]]);
        for (const name of ['Script', 'Page', 'Metadata']) {
          const el = c.one(f, name);
          if (el) c.ref(c.one(c.sequence(el, [['SourceLocation', 1, 1]]), 'SourceLocation'), 'url');
        }
        c.ref(c.one(f, 'Namespace'), 'short');
      }
    }
    const desktop = c.one(h, 'DesktopFormFactor');
    if (desktop) checkDesktop(c, desktop);
  }
  const resources = c.one(parts, 'Resources');
  if (resources) checkResources(c, resources);
}

function checkDesktop(c: Checker, desktop: XmlElement) {
  const d = c.sequence(desktop, [['GetStarted', 0, 1], ['FunctionFile', 0, 1], ['ExtensionPoint', 1, Infinity]]);
  const started = c.one(d, 'GetStarted');
  if (started) {
    const g = c.sequence(started, [['Title', 1, 1], ['Description', 1, 1], ['LearnMoreUrl', 1, 1]]);
    c.ref(c.one(g, 'Title'), 'short');
    c.ref(c.one(g, 'Description'), 'long');
    c.ref(c.one(g, 'LearnMoreUrl'), 'url');
  }
  c.ref(c.one(d, 'FunctionFile'), 'url');
  for (const ep of d.get('ExtensionPoint') ?? []) {
    if (ep.attrs['xsi:type'] !== 'PrimaryCommandSurface') { c.fail(ep, `an extension point of xsi:type ${ep.attrs['xsi:type']} is not checked here`); continue; }
    const tabs = c.sequence(ep, [['OfficeTab', 0, Infinity], ['CustomTab', 0, Infinity]]);
    for (const tab of [...(tabs.get('OfficeTab') ?? []), ...(tabs.get('CustomTab') ?? [])]) {
      c.control(tab, 'tab');
      const slots: Slot[] = tab.local === 'CustomTab' ? [['Group', 1, Infinity], ['Label', 1, 1]] : [['Group', 1, Infinity]];
      const t = c.sequence(tab, slots);
      c.ref(c.one(t, 'Label'), 'short');
      for (const group of t.get('Group') ?? []) {
        c.control(group, 'group');
        const g = c.sequence(group, [['Label', 1, 1], ['Icon', 1, 1], ['Control', 1, Infinity]]);
        c.ref(c.one(g, 'Label'), 'short');
        c.icon(c.one(g, 'Icon'));
        for (const control of g.get('Control') ?? []) checkButton(c, control);
      }
    }
  }
}

function checkButton(c: Checker, control: XmlElement) {
  c.control(control, 'control');
  if (control.attrs['xsi:type'] !== 'Button') { c.fail(control, `a control of xsi:type ${control.attrs['xsi:type']} is not checked here`); return; }
  const b = c.sequence(control, [['Label', 1, 1], ['Supertip', 1, 1], ['Icon', 1, 1], ['Action', 1, 1]]);
  c.ref(c.one(b, 'Label'), 'short');
  const tip = c.one(b, 'Supertip');
  if (tip) {
    const t = c.sequence(tip, [['Title', 1, 1], ['Description', 1, 1]]);
    c.ref(c.one(t, 'Title'), 'short');
    c.ref(c.one(t, 'Description'), 'long');
  }
  c.icon(c.one(b, 'Icon'));
  const action = c.one(b, 'Action');
  if (!action) return;
  if (action.attrs['xsi:type'] === 'ShowTaskpane') {
    const a = c.sequence(action, [['TaskpaneId', 0, 1], ['SourceLocation', 1, 1], ['Title', 0, 1]]);
    const pane = c.one(a, 'TaskpaneId');
    if (pane) c.string(pane, pane.text.trim(), 'the task pane id', 125);
    c.ref(c.one(a, 'SourceLocation'), 'url');
    c.ref(c.one(a, 'Title'), 'short');
  } else if (action.attrs['xsi:type'] === 'ExecuteFunction') {
    const fn = c.one(c.sequence(action, [['FunctionName', 1, 1]]), 'FunctionName');
    if (fn) c.string(fn, fn.text.trim(), 'the function name', 250);
  } else {
    c.fail(action, '<Action> must be of xsi:type ShowTaskpane or ExecuteFunction');
  }
}

function checkResources(c: Checker, resources: XmlElement) {
  const r = c.sequence(resources, [['Images', 0, 1], ['Urls', 0, 1], ['ShortStrings', 0, 1], ['LongStrings', 0, 1]]);
  const lists: [string, string, Kind][] = [['Images', 'Image', 'image'], ['Urls', 'Url', 'url'], ['ShortStrings', 'String', 'short'], ['LongStrings', 'String', 'long']];
  for (const [list, item, kind] of lists) {
    const el = c.one(r, list);
    if (!el) continue;
    for (const res of c.sequence(el, [[item, 1, Infinity]]).get(item) ?? []) {
      const id = c.attr(res, 'id');
      if (id === undefined) continue;
      if (id.length > MAX_RESOURCE_ID) c.fail(res, `the resource id "${id}" is longer than ${MAX_RESOURCE_ID} characters`);
      const before = c.resources.get(id);
      if (before) c.fail(res, `the resource id "${id}" is used twice (also on line ${before.line})`);
      const value = res.attrs.DefaultValue;
      if (value === undefined) { c.fail(res, `resource "${id}" has no DefaultValue`); continue; }
      if (kind === 'image' || kind === 'url') c.url(res, value, `resource "${id}"`);
      else c.string(res, value, `resource "${id}"`, kind === 'short' ? 125 : 250);
      c.resources.set(id, { kind, value, line: res.line });
    }
  }
}

const KIND_NAME: Record<Kind, string> = { image: 'an image', url: 'a URL', short: 'a short string', long: 'a long string' };

/** Every problem found, each as "line N: …"; an empty list when the manifest passes. */
export function checkManifest(xml: string, opts: ManifestCheckOptions): string[] {
  const c = new Checker(opts);
  let root: XmlElement;
  try {
    root = parseXml(xml);
  } catch (e) {
    return [`the manifest is not well-formed XML: ${e instanceof Error ? e.message : String(e)}`];
  }
  if (root.local !== 'OfficeApp') return [`line ${root.line}: the root element must be <OfficeApp>`];
  if (root.attrs.xmlns !== NS.app) c.fail(root, `<OfficeApp> must use the namespace ${NS.app}`);
  if (root.attrs['xmlns:xsi'] !== NS.xsi) c.fail(root, `xmlns:xsi must be ${NS.xsi}`);
  if (root.attrs['xmlns:bt'] !== undefined && root.attrs['xmlns:bt'] !== NS.bt) c.fail(root, `xmlns:bt must be ${NS.bt}`);
  if (root.attrs['xsi:type'] !== 'TaskPaneApp') c.fail(root, 'this add-in is a task pane add-in: xsi:type must be TaskPaneApp');
  const top = c.sequence(root, [
    ['Id', 1, 1], ['AlternateId', 0, 1], ['Version', 1, 1], ['ProviderName', 1, 1], ['DefaultLocale', 1, 1], ['DisplayName', 1, 1],
    ['Description', 1, 1], ['IconUrl', 0, 1], ['HighResolutionIconUrl', 0, 1], ['SupportUrl', 0, 1], ['AppDomains', 0, 1], ['Hosts', 0, 1],
    ['Requirements', 0, 1], ['DefaultSettings', 1, 1], ['Permissions', 1, 1], ['Dictionary', 0, 1], ['VersionOverrides', 0, 1],
  ]);
  const text = (name: string) => c.one(top, name)?.text.trim();
  const id = c.one(top, 'Id');
  if (id && !UUID.test(id.text.trim())) c.fail(id, `the add-in id must be a GUID (${id.text.trim()})`);
  const version = c.one(top, 'Version');
  if (version && !VERSION.test(version.text.trim())) c.fail(version, `the version must have one to four parts of up to five digits (${version.text.trim()})`);
  const provider = c.one(top, 'ProviderName');
  if (provider) c.string(provider, text('ProviderName'), 'the provider name', 125);
  const locale = c.one(top, 'DefaultLocale');
  if (locale && !CULTURE.test(locale.text.trim())) c.fail(locale, `the default locale must be a culture name such as en-US (${locale.text.trim()})`);
  c.setting(c.one(top, 'DisplayName'), 'short', 'the display name');
  c.setting(c.one(top, 'Description'), 'long', 'the description');
  const icon = c.one(top, 'IconUrl'), highIcon = c.one(top, 'HighResolutionIconUrl');
  if (icon) c.picture(icon, c.setting(icon, 'url', 'the icon'), 32);
  if (highIcon) c.picture(highIcon, c.setting(highIcon, 'url', 'the high-resolution icon'), 64);
  c.setting(c.one(top, 'SupportUrl'), 'url', 'the support address');
  const hosts = c.one(top, 'Hosts');
  if (hosts) for (const h of c.sequence(hosts, [['Host', 1, Infinity]]).get('Host') ?? []) c.string(h, c.attr(h, 'Name'), 'the host name', 125);
  const req = c.one(top, 'Requirements');
  if (req) {
    const sets = c.one(c.sequence(req, [['Sets', 0, 1], ['Methods', 0, 1]]), 'Sets');
    if (sets) {
      const min = sets.attrs.DefaultMinVersion;
      if (min !== undefined && !SHORT_VERSION.test(min)) c.fail(sets, `DefaultMinVersion must look like 1.1 (${min})`);
      for (const set of c.sequence(sets, [['Set', 1, Infinity]]).get('Set') ?? []) {
        c.string(set, c.attr(set, 'Name'), 'the requirement set name', 125);
        const v = set.attrs.MinVersion;
        if (v !== undefined && !SHORT_VERSION.test(v)) c.fail(set, `MinVersion must look like 1.1 (${v})`);
      }
    }
  }
  const settings = c.one(top, 'DefaultSettings');
  if (settings) c.setting(c.one(c.sequence(settings, [['SourceLocation', 1, 1]]), 'SourceLocation'), 'url', 'the task pane page');
  const permissions = c.one(top, 'Permissions');
  if (permissions && !PERMISSIONS.includes(permissions.text.trim())) c.fail(permissions, `permissions must be one of ${PERMISSIONS.join(', ')}`);
  const overrides = c.one(top, 'VersionOverrides');
  if (overrides) checkOverrides(c, overrides);

  for (const r of c.references) {
    const res = c.resources.get(r.resid);
    if (!res) c.fail(r.el, `resid "${r.resid}" names no resource`);
    else if (res.kind !== r.kind) c.fail(r.el, `resid "${r.resid}" must name ${KIND_NAME[r.kind]}, not ${KIND_NAME[res.kind]}`);
    else if (r.kind === 'image' && r.size) c.picture(r.el, res.value, r.size);
  }
  return [...new Set(c.problems)];
}
