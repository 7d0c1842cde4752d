/**
 * The [options] argument of the cell functions: plain words separated by commas or semicolons,
 * some with a value after "=", e.g. "degrees, binary" or "draws=500; seed=7". It may also be a
 * range of cells holding such words. Unknown words are refused with the list of known ones, so a
 * typing slip never passes silently.
 */
import { InputError } from '../../src/errors.js';
import { isBlank, type CellValue } from './ranges.js';

export type OptionsArgument = string | number | boolean | null | undefined | CellValue[][];

export interface OptionSpec {
  /** words that stand alone (e.g. "binary") */
  flags?: readonly string[];
  /** words that take a number after "=" (e.g. "draws") */
  numbers?: readonly string[];
}

export interface ParsedOptions {
  flags: Set<string>;
  numbers: Map<string, number>;
}

/** Spelling variants read as the same word. */
const SAME_WORD: Record<string, string> = {
  standardize: 'standardise', 'row-standardise': 'standardise', 'row-standardize': 'standardise', rows: 'standardise',
  'as-given': 'as given', asgiven: 'as given', lonlat: 'degrees', 'lon/lat': 'degrees', geographic: 'degrees',
  projected: 'planar',
};

function words(arg: OptionsArgument): string[] {
  if (arg === null || arg === undefined || arg === '') return [];
  const cells = Array.isArray(arg) ? arg.flat().filter((c) => !isBlank(c)).map(String) : [String(arg)];
  return cells.flatMap((c) => c.split(/[;,]/)).map((w) => w.trim().toLowerCase().replace(/\s+/g, ' ')).filter((w) => w !== '');
}

export function parseOptions(arg: OptionsArgument, spec: OptionSpec): ParsedOptions {
  const flags = new Set<string>();
  const numbers = new Map<string, number>();
  const known = [...(spec.flags ?? []), ...(spec.numbers ?? []).map((k) => `${k}=…`)];
  for (const w of words(arg)) {
    const eq = w.indexOf('=');
    if (eq >= 0) {
      const key = w.slice(0, eq).trim();
      const text = w.slice(eq + 1).trim();
      if (!spec.numbers?.includes(key)) throw new InputError(`The option "${w}" is not one this function knows; it knows ${known.join(', ') || 'none'}.`);
      const value = Number(text);
      if (text === '' || !Number.isFinite(value)) throw new InputError(`The option ${key} needs a number after "="; got "${text}".`);
      numbers.set(key, value);
      continue;
    }
    const word = SAME_WORD[w] ?? SAME_WORD[w.replace(/ /g, '-')] ?? w;
    if (!spec.flags?.includes(word)) throw new InputError(`The option "${w}" is not one this function knows; it knows ${known.join(', ') || 'none'}.`);
    flags.add(word);
  }
  return { flags, numbers };
}
