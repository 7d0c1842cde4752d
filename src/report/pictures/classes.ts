/**
 * Colour classes for maps. Palettes are our own, chosen to stay distinguishable with the common
 * forms of colour-vision deficiency (blue against orange, and a single-hue blue ramp).
 */

/** Six classes, dark blue (most negative) through dark orange (most positive). */
export const DIVERGING = ['#27578a', '#6b9bc8', '#c5dbef', '#fbd8b0', '#eb9950', '#a4500f'];
/** Five classes, pale to dark blue. */
export const SEQUENTIAL = ['#eef3f8', '#bcd2e7', '#7eaad0', '#4478ab', '#1b4470'];
export const NO_VALUE = '#cfcfcf';

export interface Classes {
  /** class edges, ascending, length = colours + 1 */
  breaks: number[];
  colours: string[];
  /** how the classes were formed, as the legend's closing sentence */
  method: string;
  /** no finite value to class */
  empty?: true;
}

/** Equal-width classes symmetric about zero, so zero always sits on a class edge. */
export function symmetricClasses(values: ArrayLike<number>): Classes {
  let m = 0;
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) m = Math.max(m, Math.abs(values[i]));
  if (m === 0) m = 1;
  const half = DIVERGING.length / 2;
  const breaks = Array.from({ length: DIVERGING.length + 1 }, (_, k) => ((k - half) / half) * m);
  return { breaks, colours: DIVERGING, method: 'Classes of equal width, symmetric about 0' };
}

/** Quantile classes (about equal numbers of areas per class); tied edges are merged. */
export function quantileClasses(values: ArrayLike<number>): Classes {
  const v = Array.from(values).filter(Number.isFinite).sort((a, b) => a - b);
  if (v.length === 0) return { breaks: [0, 1], colours: [SEQUENTIAL[0]], method: 'No values', empty: true };
  const k = SEQUENTIAL.length;
  const q = (p: number) => {
    // linear interpolation between order statistics (the usual sample quantile)
    const h = (v.length - 1) * p, lo = Math.floor(h);
    return lo + 1 < v.length ? v[lo] + (h - lo) * (v[lo + 1] - v[lo]) : v[lo];
  };
  const breaks: number[] = [];
  for (let i = 0; i <= k; i++) {
    const b = q(i / k);
    if (!breaks.length || b > breaks[breaks.length - 1]) breaks.push(b);
  }
  if (breaks.length === 1) breaks.push(breaks[0]);
  const n = breaks.length - 1;
  // spread the available colours over fewer classes when edges tie
  const colours = Array.from({ length: n }, (_, i) => SEQUENTIAL[n === 1 ? k - 1 : Math.round((i * (k - 1)) / (n - 1))]);
  return { breaks, colours, method: n === k ? 'Five classes with about equal numbers of areas' : `${n} classes with about equal numbers of areas` };
}

/** Colour of one value: classes are closed on the right except the first, which includes its lower edge. */
export function colourOf(c: Classes, x: number): string {
  if (!Number.isFinite(x)) return NO_VALUE;
  const { breaks, colours } = c;
  for (let i = 0; i < colours.length; i++) if (x <= breaks[i + 1]) return colours[i];
  return colours[colours.length - 1];
}
