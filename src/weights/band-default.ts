import { checkIds, checkedPoints, distanceUnit, type WeightsInput } from './input.js';
import { nearestOther } from './nearest.js';

/** A distance band's starting value, derived from where the areas are. */
export interface BandSuggestion {
  /** the suggested band: `allLinked` rounded up to two significant figures */
  distance: number;
  /** the smallest band at which every area has at least one neighbour (the largest nearest-neighbour distance) */
  allLinked: number;
  /** km for longitude/latitude (great-circle), the file's coordinate units otherwise */
  unit: 'km' | 'coordinate units';
}

/**
 * The distance band to start from: the largest of the areas' nearest-neighbour distances (below it
 * some area has no neighbour), rounded up to two significant figures so the rounded band still links
 * every area. Undefined when every area shares its location with another (no positive distance).
 */
export function suggestBandDistance(input: WeightsInput): BandSuggestion | undefined {
  checkIds(input.ids);
  const pts = checkedPoints(input, 'a distance band');
  const { distance } = nearestOther(pts);
  let allLinked = 0;
  for (const d of distance) allLinked = Math.max(allLinked, d);
  if (!(allLinked > 0) || !Number.isFinite(allLinked)) return undefined;
  return { distance: roundUpTwoFigures(allLinked), allLinked, unit: distanceUnit(pts) as BandSuggestion['unit'] };
}

/** Smallest number of two significant figures at or above x (x > 0): 12.31 → 13, 4600 → 4600, 0.0452 → 0.046. */
export function roundUpTwoFigures(x: number): number {
  const exponent = Math.floor(Math.log10(x)) - 1;
  // integer arithmetic on the scaled value keeps 4600 at 4600 (4600 / 100 is exact)
  const scale = Math.pow(10, Math.abs(exponent));
  const scaled = exponent >= 0 ? x / scale : x * scale;
  let up = Math.ceil(scaled - 1e-12 * scaled);
  let rounded = exponent >= 0 ? up * scale : up / scale;
  if (rounded < x) rounded = exponent >= 0 ? ++up * scale : ++up / scale;
  return rounded;
}
