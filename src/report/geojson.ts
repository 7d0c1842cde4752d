/**
 * The per-area results joined to the areas' shapes as GeoJSON (RFC 7946), so they can be mapped in
 * any GIS: one Feature per area, its properties named in plain words (the ID under the ID column's
 * own name, the observed outcome under its column name, then fitted values, residuals and their
 * neighbours' average per model, the neighbour count, and the local statistics when they were run).
 * Polygons are written with the exterior ring counter-clockwise and holes clockwise (RFC 7946 §3.1.6).
 * RFC 7946 expects longitude/latitude (WGS 84); projected coordinates are written as they came and
 * the caller says so (`projectedNote`).
 */
import type { AnalysisResult } from '../pipeline/types.js';
import { LOCAL_CATEGORY_LABEL } from '../pipeline/local-patterns.js';
import type { AreaGeometry } from '../geo/types.js';
import { fittedInOrder } from '../models/index.js';
import { withheldLocal, withheldOutcome } from './withheld.js';

type Position = number[];
type Json = string | number | boolean | null;

/** The property-name prefix of a model's columns, from its label: "Spatial lag model" → spatial_lag. */
function modelPrefix(label: string): string {
  return label.toLowerCase().replace(/\s+model$/, '').replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '');
}
const WITHHELD = 'withheld for privacy';
const LOCAL_KEY = { moran: 'local_moran', gi: 'getis_ord_gi', gistar: 'getis_ord_gi_star' } as const;

/** Twice the signed area of a closed ring (positive when counter-clockwise). */
function signedArea2(ring: Position[]): number {
  let s = 0;
  for (let i = 0; i + 1 < ring.length; i++) s += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return s;
}

function oriented(ring: Position[], counterClockwise: boolean): Position[] {
  const ccw = signedArea2(ring) > 0;
  const copy = ring.map((p) => [p[0], p[1]]);
  return ccw === counterClockwise ? copy : copy.reverse();
}

function geometryJson(g: AreaGeometry | undefined): Record<string, unknown> | null {
  if (!g) return null;
  if (g.kind === 'point') return { type: 'Point', coordinates: [g.point[0], g.point[1]] };
  const polygons = g.polygons.map((rings) => rings.map((ring, k) => oriented(ring, k === 0)));
  return polygons.length === 1 ? { type: 'Polygon', coordinates: polygons[0] } : { type: 'MultiPolygon', coordinates: polygons };
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Property names that would collide with the results' own are given a suffix. */
function uniqueKey(name: string, taken: Set<string>): string {
  let key = name;
  for (let k = 2; taken.has(key); k++) key = `${name}_${k}`;
  taken.add(key);
  return key;
}

/** The GeoJSON FeatureCollection of one run's areas with their results. */
export function resultsGeoJson(result: AnalysisResult): { type: 'FeatureCollection'; features: unknown[] } {
  const taken = new Set<string>();
  const idKey = uniqueKey(result.request.id, taken);
  const rowKey = uniqueKey('table_row', taken);
  const yKey = uniqueKey(result.request.y, taken);
  const neighbourKey = uniqueKey('neighbour_count', taken);
  const columns: { key: string; value: (i: number) => Json }[] = [];
  // areas withheld for privacy (a rate of few events) are left blank as in the workbook: the outcome and
  // residuals when the outcome is the rate, the local figures when they were drawn from it
  const hideY = withheldOutcome(result);
  const hideLocal = withheldLocal(result);
  const add = (name: string, value: (i: number) => Json) => columns.push({ key: uniqueKey(name, taken), value });
  // every fitted model in registry order: the plain regression, then the spatial models asked for
  for (const { entry, fit } of fittedInOrder(result.fits)) {
    const prefix = modelPrefix(entry.label);
    add(`${prefix}_fitted`, (i) => finite(fit.fitted[i]));
    add(`${prefix}_residual`, (i) => (hideY?.[i] ? null : finite(fit.residuals[i])));
    add(`${prefix}_neighbours_residual`, (i) => finite(fit.residualLag[i]));
  }
  for (const [kind, outcome] of Object.entries(result.local?.results ?? {})) {
    if (!outcome) continue;
    const key = LOCAL_KEY[kind as keyof typeof LOCAL_KEY];
    const p = outcome.pPermutation ?? outcome.p;
    const shown = (f: (i: number) => Json) => (i: number) => (hideLocal?.[i] ? null : f(i));
    add(key, shown((i) => finite(outcome.value[i])));
    add(`${key}_z`, shown((i) => finite(outcome.z[i])));
    add(`${key}_p`, shown((i) => finite(p[i])));
    add(`${key}_p_adjusted`, shown((i) => finite(outcome.adjusted[i])));
    if (outcome.categories) add(`${key}_group`, (i) => (hideLocal?.[i] ? WITHHELD : LOCAL_CATEGORY_LABEL[outcome.categories![i]]));
    else add(`${key}_finding`, (i) => (hideLocal?.[i] ? WITHHELD : outcome.neighbourCount[i] === 0 ? 'no neighbours' : !outcome.significant[i] ? 'not significant' : outcome.z[i] > 0 ? 'cluster of high values' : 'cluster of low values'));
  }
  const counts = new Int32Array(result.n);
  for (const from of result.weights.edges.from) counts[from]++;
  const features = result.ids.map((id, i) => {
    const properties: Record<string, Json> = { [idKey]: id, [rowKey]: result.rows[i], [yKey]: hideY?.[i] ? null : finite(result.y[i]), [neighbourKey]: counts[i] };
    for (const c of columns) properties[c.key] = c.value(i);
    return { type: 'Feature', properties, geometry: geometryJson(result.geometries[i]) };
  });
  return { type: 'FeatureCollection', features };
}

/** The GeoJSON text (one feature per line, so large files stay readable and diff well). */
export function resultsGeoJsonText(result: AnalysisResult): string {
  const fc = resultsGeoJson(result);
  return `{"type":"FeatureCollection","features":[\n${fc.features.map((f) => JSON.stringify(f)).join(',\n')}\n]}\n`;
}

/** Said beside the file when the coordinates are not longitude/latitude. */
export function projectedNote(result: Pick<AnalysisResult, 'coordinates'>): string | null {
  return result.coordinates === 'projected'
    ? 'The boundary coordinates are projected, not longitude/latitude: the GeoJSON keeps them as they came, which RFC 7946 does not expect. Tell your GIS the projection of the original boundary file when you open it.'
    : null;
}
