/**
 * Accessibility checks for the browser tests: axe-core (the open rules engine, injected from its
 * npm package) run against the WCAG 2.0/2.1 level A and AA rules, and the screen-reader tree of a
 * control read with playwright's aria snapshot.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
/** WCAG 2.1 level AA includes the level A rules and those of 2.0. */
export const WCAG_21_AA = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

export interface AxeFinding {
  rule: string;
  impact: string | null;
  help: string;
  targets: string[];
}

/**
 * axe-core's findings on the page as it stands, WCAG 2.1 AA only. The source goes in through the
 * debugging protocol (page.evaluate), not a script tag, so the page's Content-Security-Policy stays
 * as strict as users get it.
 */
export async function axeFindings(page: Page): Promise<AxeFinding[]> {
  // colours are measured as they rest, not half-way through a transition (a button just enabled fades in)
  await page.evaluate('Promise.all(document.getAnimations().map((a) => a.finished.catch(() => undefined)))');
  const has = await page.evaluate('typeof window.axe === "object"');
  if (!has) await page.evaluate(AXE_SOURCE);
  const result = (await page.evaluate(`window.axe.run(document, { runOnly: { type: 'tag', values: ${JSON.stringify(WCAG_21_AA)} }, resultTypes: ['violations'] })`)) as {
    violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] }[];
  };
  return result.violations.map((v) => ({ rule: v.id, impact: v.impact, help: v.help, targets: v.nodes.map((n) => n.target.map(String).join(' ')) }));
}

/** A one-line-per-finding text for an assertion message. */
export function describeFindings(findings: AxeFinding[]): string {
  return findings.map((f) => `${f.rule} (${f.impact}): ${f.help} — ${f.targets.slice(0, 4).join(', ')}`).join('\n');
}

/** ids used by more than one element (a label or a focus jump would go to the wrong control). */
export async function repeatedIds(page: Page): Promise<string[]> {
  return (await page.evaluate(`(() => {
    const seen = new Map();
    for (const el of document.querySelectorAll('[id]')) seen.set(el.id, (seen.get(el.id) ?? 0) + 1);
    return [...seen].filter(([, n]) => n > 1).map(([id]) => id);
  })()`)) as string[];
}

/** Everything the browser tests check about accessibility at one step: axe's WCAG 2.1 AA rules and unique ids. */
export async function accessibilityProblems(page: Page): Promise<string> {
  const findings = await axeFindings(page);
  const ids = await repeatedIds(page);
  return [describeFindings(findings), ids.length ? `ids used more than once: ${ids.join(', ')}` : ''].filter(Boolean).join('\n');
}

/**
 * The focused element as a screen reader gets it: role and accessible name from Chromium's own
 * accessibility tree (through the debugging protocol), not from the DOM.
 */
export async function focusedAsRead(page: Page): Promise<{ role: string; name: string; tag: string; id: string }> {
  const cdp = await page.context().newCDPSession(page);
  try {
    const { result } = (await cdp.send('Runtime.evaluate', { expression: 'document.activeElement' })) as { result: { objectId?: string } };
    const tagAndId = (await page.evaluate('[document.activeElement?.tagName ?? "", document.activeElement?.id ?? ""]')) as [string, string];
    if (!result.objectId) return { role: '', name: '', tag: tagAndId[0], id: tagAndId[1] };
    const { nodes } = (await cdp.send('Accessibility.getPartialAXTree', { objectId: result.objectId, fetchRelatives: false })) as {
      nodes: { ignored?: boolean; role?: { value?: string }; name?: { value?: string } }[];
    };
    const node = nodes.find((n) => !n.ignored) ?? nodes[0];
    return { role: String(node?.role?.value ?? ''), name: String(node?.name?.value ?? ''), tag: tagAndId[0], id: tagAndId[1] };
  } finally {
    await cdp.detach();
  }
}
