import type { CoordinateKind } from '../../geo/types.js';
import type { Frame } from './projection.js';
import { c1, text } from './svg.js';
import { formatCount } from '../../core/count.js';
import { EARTH_RADIUS_KM } from '../../geo/index.js';

/** Kilometres per degree of latitude on the sphere the distances use (2πR / 360, R the mean Earth radius). */
const KM_PER_DEGREE = (2 * Math.PI * EARTH_RADIUS_KM) / 360;
const FEET_PER_MILE = 5280;

/** A "nice" length (1, 2 or 5 × a power of ten) not longer than `max`. */
function niceLength(max: number): number {
  const p = Math.pow(10, Math.floor(Math.log10(max)));
  for (const m of [5, 2, 1]) if (m * p <= max) return m * p;
  return p;
}

const plain = formatCount;

/**
 * A scale bar in the unit a reader thinks in: kilometres (or metres) for longitude/latitude and for
 * coordinates stated in metres, miles (or feet) for coordinates stated in feet, and "map units" only
 * when the file does not say. Longitude/latitude maps are drawn with longitude shrunk by the cosine
 * of the middle latitude (projection.ts), so the bar holds along the map's middle latitude.
 */
export function scaleBar(frame: Frame, coordinates: CoordinateKind, unit: 'metre' | 'foot' | 'us-foot' | undefined, x: number, y: number): string[] {
  const room = frame.width * 0.3;
  let px: number, words: string;
  if (coordinates === 'geographic' || unit === 'metre') {
    const pxPerKm = coordinates === 'geographic' ? frame.scale / KM_PER_DEGREE : frame.scale * 1000;
    const km = niceLength(room / pxPerKm);
    px = km * pxPerKm;
    words = km >= 1 ? `${plain(km)} km` : `${plain(Math.round(km * 1000))} m`;
  } else if (unit === 'foot' || unit === 'us-foot') {
    const pxPerMile = frame.scale * FEET_PER_MILE;
    const miles = niceLength(room / pxPerMile);
    px = miles * pxPerMile;
    words = miles >= 1 ? `${plain(miles)} mile${miles === 1 ? '' : 's'}` : `${plain(Math.round(miles * FEET_PER_MILE))} feet`;
  } else {
    const units = niceLength(room / frame.scale);
    px = units * frame.scale;
    words = `${plain(units)} map units (the file does not state its unit)`;
  }
  return [
    `<path d="M${x} ${y - 5}V${y}H${c1(x + px)}V${y - 5}" fill="none" stroke="#333333" stroke-width="1.5"/>`,
    text(x + px + 8, y + 1, words, 'font-size="11" fill="#333333"'),
  ];
}
