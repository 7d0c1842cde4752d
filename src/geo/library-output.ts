/**
 * Runs a library call with the console captured: what a library prints (exceljs warns about long
 * sheet names, for instance) must not reach the terminal ahead of, or instead of, our own message.
 * The captured lines come back so the caller can turn them into notes. Only one capture runs at a
 * time per thread; a nested call shares the outer one.
 */
const METHODS = ['log', 'info', 'warn', 'error', 'debug'] as const;
let depth = 0;
let sink: string[] | null = null;

export async function capturingConsole(fn: () => Promise<void>): Promise<{ said: string[]; error?: unknown }> {
  const said: string[] = [];
  const outer = sink;
  const saved = METHODS.map((m) => console[m]);
  if (depth === 0) {
    for (const m of METHODS) {
      console[m] = (...args: unknown[]) => { sink?.push(args.map(String).join(' ')); };
    }
  }
  depth++;
  sink = said;
  try {
    await fn();
    return { said: shorten(said) };
  } catch (error) {
    return { said: shorten(said), error };
  } finally {
    depth--;
    sink = outer;
    if (outer) outer.push(...said);
    if (depth === 0) METHODS.forEach((m, i) => { console[m] = saved[i]; });
  }
}

/** Library lines can quote whole sheet names or values: at most 3 lines of 200 characters. */
function shorten(lines: string[]): string[] {
  // the middle goes: the end of a library line usually says what happened ("... will be truncated")
  const out = lines.slice(0, 3).map((l) => (l.length > 200 ? `${l.slice(0, 110)}…${l.slice(-80)}` : l));
  if (lines.length > 3) out.push(`(and ${lines.length - 3} more)`);
  return out;
}
