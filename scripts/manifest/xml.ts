/**
 * A small reader for the add-in manifest's XML: elements in document order with their attributes and
 * text, and the line each starts on, so a rule can say where it failed. Enough for a manifest (no DTDs,
 * no processing beyond the XML declaration and comments); anything it cannot read is an error.
 */

export interface XmlElement {
  /** qualified name as written, e.g. "bt:Image" */
  name: string;
  /** local name, e.g. "Image" */
  local: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  text: string;
  line: number;
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

function decode(s: string): string {
  return s.replace(/&(#x[0-9a-f]+|#\d+|\w+);/gi, (m, e: string) => {
    if (e[0] === '#') return String.fromCodePoint(e[1].toLowerCase() === 'x' ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10));
    const v = ENTITIES[e];
    if (v === undefined) throw new Error(`unknown entity ${m}`);
    return v;
  });
}

export function parseXml(xml: string): XmlElement {
  let i = 0;
  const lineAt = (pos: number) => xml.slice(0, pos).split('\n').length;
  const stack: XmlElement[] = [];
  let root: XmlElement | null = null;
  while (i < xml.length) {
    const lt = xml.indexOf('<', i);
    if (lt < 0) {
      if (xml.slice(i).trim()) throw new Error(`text after the root element at line ${lineAt(i)}`);
      break;
    }
    if (stack.length) stack[stack.length - 1].text += decode(xml.slice(i, lt));
    else if (xml.slice(i, lt).trim()) throw new Error(`text outside the root element at line ${lineAt(i)}`);
    if (xml.startsWith('<!--', lt)) {
      const end = xml.indexOf('-->', lt);
      if (end < 0) throw new Error(`unclosed comment at line ${lineAt(lt)}`);
      i = end + 3;
      continue;
    }
    if (xml.startsWith('<?', lt)) {
      const end = xml.indexOf('?>', lt);
      if (end < 0) throw new Error(`unclosed declaration at line ${lineAt(lt)}`);
      i = end + 2;
      continue;
    }
    if (xml.startsWith('<!', lt)) throw new Error(`declarations are not expected in a manifest (line ${lineAt(lt)})`);
    const gt = xml.indexOf('>', lt);
    if (gt < 0) throw new Error(`unclosed tag at line ${lineAt(lt)}`);
    const tag = xml.slice(lt + 1, gt);
    if (tag.startsWith('/')) {
      const name = tag.slice(1).trim();
      const open = stack.pop();
      if (!open || open.name !== name) throw new Error(`</${name}> at line ${lineAt(lt)} does not close <${open?.name ?? '(nothing)'}>`);
      i = gt + 1;
      continue;
    }
    const selfClosing = tag.endsWith('/');
    const body = selfClosing ? tag.slice(0, -1) : tag;
    const m = /^([\w:.-]+)([\s\S]*)$/.exec(body);
    if (!m) throw new Error(`unreadable tag at line ${lineAt(lt)}`);
    const attrs: Record<string, string> = {};
    const rest = m[2];
    const attrRe = /\s*([\w:.-]+)\s*=\s*("([^"]*)"|'([^']*)')/gy;
    let a: RegExpExecArray | null;
    let consumed = 0;
    while ((a = attrRe.exec(rest))) {
      if (a[1] in attrs) throw new Error(`attribute ${a[1]} given twice at line ${lineAt(lt)}`);
      attrs[a[1]] = decode(a[3] ?? a[4]);
      consumed = attrRe.lastIndex;
    }
    if (rest.slice(consumed).trim()) throw new Error(`unreadable attributes in <${m[1]}> at line ${lineAt(lt)}`);
    const el: XmlElement = { name: m[1], local: m[1].replace(/^.*:/, ''), attrs, children: [], text: '', line: lineAt(lt) };
    if (stack.length) stack[stack.length - 1].children.push(el);
    else if (root) throw new Error(`a second root element at line ${lineAt(lt)}`);
    else root = el;
    if (!selfClosing) stack.push(el);
    i = gt + 1;
  }
  if (stack.length) throw new Error(`<${stack[stack.length - 1].name}> is never closed`);
  if (!root) throw new Error('no root element');
  return root;
}
