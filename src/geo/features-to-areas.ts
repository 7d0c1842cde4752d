/**
 * Turns parsed GeoJSON (from a .geojson file, a TopoJSON object or a shapefile) into validated areas.
 * Coordinates are used in place as JSON.parse produced them (no copying of positions), so a layer of
 * 90,000 polygons costs one pass over its numbers.
 */
import { InputError, listSome } from '../errors.js';
import type { Area, AreaGeometry } from './types.js';
import { featureLabel } from './feature-label.js';
import { CROSSING_CHECK_MAX_VERTICES, ringIsClosed, ringSelfCrosses, ringSignedArea } from './ring-checks.js';
import { formatCount } from '../core/count.js';

/** Coordinate bounds gathered while validating: [minX, minY, maxX, maxY]. */
export type Bounds = [number, number, number, number];

export interface ConvertResult {
  areas: Area[];
  propertyNames: string[];
  bounds: Bounds;
  warnings: string[];
}

/** Coordinates beyond this size are no map's: areas and distances computed from them overflow. */
const MAX_COORDINATE = 1e12;

const SUPPORTED = 'only polygons (Polygon, MultiPolygon) and points (Point, or a MultiPoint of one point) are supported';

interface FeatureContext {
  file: string;
  feature: number;
  label: string;
  bounds: Bounds;
  crossings: string[];
  longRings: number;
  droppedParts: number;
  keepFlat: boolean;
  flat: boolean;
  step: [number, number] | null;
  closed: number;
}

/** Accepts a FeatureCollection, a single Feature or a bare geometry. */
export interface ConvertOptions {
  /** Keep features whose whole polygon has zero area (with a warning) instead of refusing them.
   *  Used for quantized TopoJSON, where a small area can collapse onto a line at the chosen grid. */
  keepFlatFeatures?: boolean;
  /** Grid step [dx, dy] of quantized TopoJSON: a ring whose ends are within one step is closed by
   *  repeating its first position, with a warning (the arcs of such files can miss by one step). */
  closeWithinStep?: [number, number];
  /** The file's own number of each feature given (when some records were left out before), for messages. */
  featureNumbers?: number[];
}

export function featuresToAreas(root: unknown, file: string, opts: ConvertOptions = {}): ConvertResult {
  const features = featureList(root, file);
  const bounds: Bounds = [Infinity, Infinity, -Infinity, -Infinity];
  const areas: Area[] = new Array(features.length);
  const names = new Set<string>();
  const crossings: string[] = [];
  let longRings = 0;
  const dropped: string[] = [];
  const flat: string[] = [];
  const closedRings: string[] = [];
  let firstKind: { kind: AreaGeometry['kind']; feature: number } | null = null;

  for (let i = 0; i < features.length; i++) {
    const number = opts.featureNumbers?.[i] ?? i + 1;
    const f = features[i] as Record<string, unknown> | null;
    if (f === null || typeof f !== 'object' || Array.isArray(f)) {
      throw new InputError(`${file}: feature ${number} is not a GeoJSON Feature object.`, { file, feature: number });
    }
    if (f.type !== 'Feature') {
      throw new InputError(
        `${file}: feature ${number} has type ${JSON.stringify(f.type)} where "Feature" was expected.`,
        { file, feature: number },
      );
    }
    let properties = (f.properties ?? {}) as Record<string, unknown>;
    if (typeof properties !== 'object' || Array.isArray(properties)) {
      throw new InputError(`${file}: feature ${number} has properties that are not an object.`, { file, feature: number });
    }
    // The GeoJSON `id` member becomes the property "id" (unless one exists) so it can serve as join key.
    if (f.id !== undefined && f.id !== null && !Object.hasOwn(properties, 'id')) properties = { id: f.id, ...properties };
    // Without a prototype, a name such as "constructor" or "toString" reads as absent on a feature
    // that lacks it, never as a function inherited from Object.
    Object.setPrototypeOf(properties, null);
    for (const key in properties) names.add(key);
    const ctx: FeatureContext = { file, feature: number, label: featureLabel(number, properties, f.id), bounds, crossings, longRings: 0, droppedParts: 0, keepFlat: !!opts.keepFlatFeatures, flat: false, step: opts.closeWithinStep ?? null, closed: 0 };
    const geometry = convertGeometry(f.geometry, ctx);
    longRings += ctx.longRings;
    if (ctx.droppedParts > 0) dropped.push(ctx.label);
    if (ctx.flat) flat.push(ctx.label);
    if (ctx.closed > 0) closedRings.push(ctx.label);
    if (geometry) {
      if (!firstKind) firstKind = { kind: geometry.kind, feature: number };
      else if (firstKind.kind !== geometry.kind) {
        throw new InputError(
          `${file}: ${ctx.label} is a ${geometry.kind} but feature ${firstKind.feature} is a ${firstKind.kind}; ` +
            'a boundary file must hold only polygons or only points.',
          { file, feature: number },
        );
      }
    }
    areas[i] = { feature: number, geometry, properties };
  }
  if (!firstKind) {
    throw new InputError(`${file}: none of its ${formatCount(features.length)} features has a geometry.`, { file });
  }
  const warnings: string[] = [];
  if (crossings.length > 0) {
    warnings.push(
      `${file}: ${formatCount(crossings.length)} feature(s) have a ring that crosses or touches itself: ${listSome(crossings)}. ` +
        'Neighbours and centroids may be off for these; repairing the geometry in a GIS is advised.',
    );
  }
  if (closedRings.length > 0) {
    warnings.push(
      `${file}: ${formatCount(closedRings.length)} feature(s) had a ring whose ends missed each other by one grid step of the ` +
        `quantized file; each was closed by repeating its first position: ${listSome(closedRings)}.`,
    );
  }
  if (flat.length > 0) {
    warnings.push(
      `${file}: ${formatCount(flat.length)} feature(s) have zero area at the file's coordinate precision and were kept as they are ` +
        `(their centroid is the mean of their vertices): ${listSome(flat)}.`,
    );
  }
  if (dropped.length > 0) {
    warnings.push(
      `${file}: ${formatCount(dropped.length)} feature(s) had zero-area polygon parts or holes, which were left out: ${listSome(dropped)}.`,
    );
  }
  if (longRings > 0) {
    warnings.push(`${file}: ${formatCount(longRings)} ring(s) have more than ${formatCount(CROSSING_CHECK_MAX_VERTICES)} vertices and were not checked for self-crossings.`);
  }
  return { areas, propertyNames: [...names], bounds, warnings };
}

function featureList(root: unknown, file: string): unknown[] {
  if (root === null || typeof root !== 'object' || Array.isArray(root)) {
    throw new InputError(`${file} is not a GeoJSON object (expected a FeatureCollection).`, { file });
  }
  const type = (root as { type?: unknown }).type;
  if (type === 'FeatureCollection') {
    const features = (root as { features?: unknown }).features;
    if (!Array.isArray(features)) throw new InputError(`${file}: the FeatureCollection has no "features" list.`, { file });
    if (features.length === 0) throw new InputError(`${file}: the FeatureCollection is empty (0 features).`, { file });
    return features;
  }
  if (type === 'Feature') return [root];
  if (typeof type === 'string' && GEOMETRY_TYPES.has(type)) return [{ type: 'Feature', properties: {}, geometry: root }];
  throw new InputError(
    `${file}: type ${JSON.stringify(type)} is not GeoJSON; expected a FeatureCollection, a Feature or a geometry.`,
    { file },
  );
}

const GEOMETRY_TYPES = new Set(['Point', 'MultiPoint', 'LineString', 'MultiLineString', 'Polygon', 'MultiPolygon', 'GeometryCollection']);

function convertGeometry(g: unknown, ctx: FeatureContext): AreaGeometry | null {
  if (g === null || g === undefined) return null;
  const { file, feature, label } = ctx;
  const type = (g as { type?: unknown }).type;
  const coords = (g as { coordinates?: unknown }).coordinates;
  switch (type) {
    case 'Point':
      return { kind: 'point', point: pointOf(coords, ctx, 'its point') };
    case 'MultiPoint': {
      if (!Array.isArray(coords)) throw bad(ctx, 'has a MultiPoint without a coordinates list');
      if (coords.length === 0) return null;
      if (coords.length > 1) {
        throw new InputError(`${file}: ${label} is a MultiPoint of ${formatCount(coords.length)} points; ${SUPPORTED}.`, { file, feature });
      }
      return { kind: 'point', point: pointOf(coords[0], ctx, 'its point') };
    }
    case 'Polygon':
      if (!Array.isArray(coords)) throw bad(ctx, 'has a Polygon without a coordinates list');
      if (coords.length === 0) return null;
      if (!checkPolygon(coords, 0, false, ctx)) {
        if (!ctx.keepFlat) throw zeroArea(ctx, 'ring 1');
        ctx.flat = true;
      }
      return { kind: 'polygon', polygons: [coords as number[][][]] };
    case 'MultiPolygon': {
      if (!Array.isArray(coords)) throw bad(ctx, 'has a MultiPolygon without a coordinates list');
      let polygons = coords as number[][][][];
      if (polygons.length === 0) return null;
      let kept: number[][][][] | null = null;
      for (let p = 0; p < polygons.length; p++) {
        const ok = checkPolygon(polygons[p], p, true, ctx);
        if (!ok && !kept) kept = polygons.slice(0, p);
        else if (ok && kept) kept.push(polygons[p]);
      }
      if (kept) {
        // Zero-area parts beside real ones come from coarse quantization (TopoJSON) or slivers: they
        // carry no area, so they are dropped and counted; a feature with nothing else left is an error.
        if (kept.length > 0) {
          ctx.droppedParts += polygons.length - kept.length;
          polygons = kept;
        } else if (!ctx.keepFlat) throw zeroArea(ctx, 'every polygon');
        else ctx.flat = true;
      }
      return { kind: 'polygon', polygons };
    }
    default:
      throw new InputError(
        `${file}: ${label} is ${typeof type === 'string' ? `a ${type}` : 'not a known geometry'}; ${SUPPORTED}.`,
        { file, feature },
      );
  }
}

function zeroArea(ctx: FeatureContext, where: string): InputError {
  return bad(ctx, `has zero area in ${where} (its positions lie on a line or a point); remove or repair the feature`);
}

function bad(ctx: FeatureContext, what: string): InputError {
  return new InputError(`${ctx.file}: ${ctx.label} ${what}.`, { file: ctx.file, feature: ctx.feature });
}

function pointOf(p: unknown, ctx: FeatureContext, where: string): [number, number] {
  checkPosition(p, ctx, where);
  const q = p as number[];
  return [q[0], q[1]];
}

function at(where: string, k: number): string {
  return k < 0 ? where : `${where}, position ${k + 1}`;
}

/** Validates one position and widens the bounds; allocates nothing. */
function checkPosition(p: unknown, ctx: FeatureContext, where: string, k = -1): void {
  if (!Array.isArray(p) || p.length < 2) throw bad(ctx, `has a position that is not [x, y] at ${at(where, k)}`);
  const x = p[0];
  const y = p[1];
  if (typeof x !== 'number' || typeof y !== 'number' || !Number.isFinite(x) || !Number.isFinite(y)) {
    throw bad(ctx, `has a non-numeric or non-finite coordinate (${String(x)}, ${String(y)}) at ${at(where, k)}`);
  }
  if (Math.abs(x) > MAX_COORDINATE || Math.abs(y) > MAX_COORDINATE) {
    throw bad(ctx, `has a coordinate (${x}, ${y}) at ${at(where, k)} beyond ±1e12, larger than any map's coordinates ` +
      '(metres around the whole Earth stay below 1e8); the file is damaged, or its numbers are not coordinates');
  }
  const b = ctx.bounds;
  if (x < b[0]) b[0] = x;
  if (y < b[1]) b[1] = y;
  if (x > b[2]) b[2] = x;
  if (y > b[3]) b[3] = y;
}

/** Validates a polygon's rings; returns false when its outer ring has zero area. Zero-area holes are dropped. */
function checkPolygon(polygon: unknown, index: number, multi: boolean, ctx: FeatureContext): boolean {
  const partName = multi ? `polygon ${index + 1}, ` : '';
  if (!Array.isArray(polygon) || polygon.length === 0) throw bad(ctx, `has ${partName || 'a polygon '}without rings`);
  let flatHoles = 0;
  for (let r = 0; r < polygon.length; r++) {
    const ring = polygon[r] as unknown;
    const where = `${partName}ring ${r + 1}`;
    if (!Array.isArray(ring)) throw bad(ctx, `has ${where} that is not a list of positions`);
    if (ring.length < 4) {
      throw bad(ctx, `has ${where} with ${ring.length} position(s); a closed ring needs at least 4 (the last repeating the first)`);
    }
    for (let k = 0; k < ring.length; k++) checkPosition(ring[k], ctx, where, k);
    const positions = ring as number[][];
    if (!ringIsClosed(positions) && ctx.step && withinStep(positions, ctx.step)) {
      positions.push([positions[0][0], positions[0][1]]);
      ctx.closed++;
    }
    if (!ringIsClosed(positions)) {
      const a = positions[0];
      const z = positions[positions.length - 1];
      throw bad(
        ctx,
        `has ${where} that is not closed: it starts at (${a[0]}, ${a[1]}) but ends at (${z[0]}, ${z[1]}). ` +
          'Close the ring (repeat the first position at the end) in the program that wrote the file',
      );
    }
    const last = positions[positions.length - 1];
    last[0] = positions[0][0]; // closed within noise: make it exact so shared vertices compare equal
    last[1] = positions[0][1];
    if (isDegenerate(positions)) {
      const extent = extentOf(positions);
      if (extent[0] > 0 && extent[1] > 0 && extent[0] * extent[1] === 0) {
        throw bad(ctx, `has ${where} spanning only ${extent[0]} by ${extent[1]} coordinate units, too small for its area to be computed; ` +
          'the coordinates are in units far too large for the data (rescale them)');
      }
      if (r === 0) return false;
      flatHoles++;
      continue;
    }
    if (positions.length - 1 > CROSSING_CHECK_MAX_VERTICES) ctx.longRings++;
    else if ((ctx.crossings.length === 0 || ctx.crossings[ctx.crossings.length - 1] !== ctx.label) && ringSelfCrosses(positions)) {
      ctx.crossings.push(ctx.label);
    }
  }
  if (flatHoles > 0) {
    const rings = polygon as number[][][];
    const kept = rings.filter((ring, r) => r === 0 || !isDegenerate(ring));
    rings.length = 0;
    rings.push(...kept);
    ctx.droppedParts += flatHoles;
  }
  return true;
}

function withinStep(ring: number[][], step: [number, number]): boolean {
  const a = ring[0];
  const z = ring[ring.length - 1];
  return Math.abs(a[0] - z[0]) <= step[0] * (1 + 1e-9) && Math.abs(a[1] - z[1]) <= step[1] * (1 + 1e-9);
}

function extentOf(ring: number[][]): [number, number] {
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const p of ring) {
    if (p[0] < minX) minX = p[0];
    if (p[0] > maxX) maxX = p[0];
    if (p[1] < minY) minY = p[1];
    if (p[1] > maxY) maxY = p[1];
  }
  return [maxX - minX, maxY - minY];
}

function isDegenerate(ring: number[][]): boolean {
  const [width, height] = extentOf(ring);
  const box = width * height;
  return box === 0 || Math.abs(ringSignedArea(ring)) <= 1e-12 * box;
}
