/** GeoJSON and TopoJSON boundary files. TopoJSON is decoded with topojson-client's `feature`. */
import { feature } from 'topojson-client';
import type { Topology } from 'topojson-specification';
import { InputError } from '../errors.js';
import type { AreaLayer, CoordinateKind } from './types.js';
import { featuresToAreas } from './features-to-areas.js';
import { jsonErrorOffset } from './json-error-position.js';
import { decodeText } from './decode-text.js';
import { claimFromGeoJsonCrs, claimFromOwnMember, decideCoordinates, type CoordinateClaim } from './coordinate-kind.js';

export function parseJsonBytes(bytes: Uint8Array, file: string, notes?: string[]): unknown {
  const decoded = decodeText(bytes, file, { kind: 'GeoJSON or TopoJSON' });
  notes?.push(...decoded.warnings);
  let text = decoded.text;
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') throw new InputError(`${file} is empty.`, { file });
  try {
    return JSON.parse(text);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    throw new InputError(`${file} is not valid JSON${jsonErrorPlace(text, message)}: ${message}.`, { file });
  }
}

/** " at line 3, column 17" from the character position in the engine's message, when it gives one. */
function jsonErrorPlace(text: string, message: string): string {
  const lineCol = /line (\d+) column (\d+)/.exec(message);
  if (lineCol) return ` at line ${lineCol[1]}, column ${lineCol[2]}`;
  const pos = /position (\d+)/.exec(message);
  const at = pos ? Number(pos[1]) : jsonErrorOffset(text);
  if (at >= 0) {
    let line = 1;
    let lineStart = 0;
    for (let i = 0; i < at && i < text.length; i++) {
      if (text.charCodeAt(i) === 10) {
        line++;
        lineStart = i + 1;
      }
    }
    return ` at line ${line}, column ${at - lineStart + 1}`;
  }
  if (/end of JSON input/i.test(message)) return ' (it ends too early; the file may be truncated)';
  return '';
}

export function isTopology(root: unknown): root is Topology {
  return !!root && typeof root === 'object' && (root as { type?: unknown }).type === 'Topology';
}

export function layerFromGeoJson(root: unknown, file: string, override?: CoordinateKind): AreaLayer {
  const converted = featuresToAreas(root, file);
  const claim = claimFromGeoJsonCrs(root, file) ?? claimFromOwnMember(root, file);
  return layerOf(file, converted, claim, override);
}

/** Decodes one object of a topology (the named one, else the first) into areas. */
export function layerFromTopology(topology: Topology, file: string, layer?: string, override?: CoordinateKind): AreaLayer {
  const objects = topology.objects && typeof topology.objects === 'object' && !Array.isArray(topology.objects) ? topology.objects : {};
  const names = Object.keys(objects);
  if (names.length === 0) throw new InputError(`${file}: the TopoJSON file has no objects.`, { file });
  const name = layer ?? names[0];
  if (!Object.hasOwn(objects, name)) {
    throw new InputError(`${file}: the TopoJSON file has no object named "${name}"; it has ${names.map((n) => `"${n}"`).join(', ')}.`, { file });
  }
  checkArcIndexes(topology, objects[name], file, name);
  let decoded: unknown;
  try {
    decoded = feature(topology, objects[name]);
  } catch (e) {
    throw new InputError(
      `${file}: object "${name}" could not be decoded as TopoJSON (${e instanceof Error ? e.message : String(e)}).`,
      { file },
    );
  }
  const source = `${file} (object "${name}")`;
  const scale = topology.transform?.scale;
  const converted = featuresToAreas(decoded, source, {
    keepFlatFeatures: !!topology.transform,
    ...(scale ? { closeWithinStep: [Math.abs(scale[0]), Math.abs(scale[1])] as [number, number] } : {}),
  });
  let claim: CoordinateClaim | null = null;
  const stated = topology.bbox;
  // a 3-D bbox is [minX, minY, minZ, maxX, maxY, maxZ]
  const bbox = Array.isArray(stated) && stated.length === 6 ? [stated[0], stated[1], stated[3], stated[4]] : stated;
  if (!override && Array.isArray(bbox) && bbox.length === 4 && bbox.every((v) => Number.isFinite(v))) {
    // The bbox is stated by the writer; inside degree ranges it counts as a claim of longitude/latitude.
    // Outside them the ranges decide (so swapped axes are still caught).
    const inDegrees = bbox[0] >= -180 && bbox[2] <= 180 && bbox[1] >= -90 && bbox[3] <= 90;
    if (inDegrees) {
      claim = {
        kind: 'geographic',
        says: `the TopoJSON bbox [${bbox.slice(0, 4).join(', ')}] lies within ±180/±90` +
          (topology.transform ? ' (quantized coordinates, decoded with its transform)' : ''),
      };
    }
  }
  return layerOf(source, converted, claim, override);
}

/** The layer from converted features, with the coordinate kind decided from the claim and the bounds. */
function layerOf(source: string, converted: ReturnType<typeof featuresToAreas>, claim: CoordinateClaim | null, override?: CoordinateKind): AreaLayer {
  const decision = decideCoordinates(converted.bounds, claim, source, override, converted.areas);
  return {
    sourceName: source,
    areas: converted.areas,
    propertyNames: converted.propertyNames,
    coordinates: decision.coordinates,
    coordinateEvidence: decision.coordinateEvidence,
    ...(decision.guessed ? { coordinatesGuessed: true } : {}),
    ...(decision.unit ? { coordinateUnit: decision.unit } : {}),
    warnings: [...converted.warnings, ...decision.warnings],
  };
}

/**
 * Every arc index of the object's geometries must name an arc of the topology (TopoJSON
 * specification 2.0, section 2.1.4: index i, or ~i = -i - 1 for the arc reversed). Checked before
 * decoding, so a bad index is named by its feature and arc rather than met as a decoder failure.
 */
function checkArcIndexes(topology: Topology, object: unknown, file: string, name: string): void {
  const arcCount = Array.isArray((topology as { arcs?: unknown }).arcs) ? (topology as { arcs: unknown[] }).arcs.length : 0;
  const geometries: unknown[] = (object as { type?: unknown })?.type === 'GeometryCollection'
    ? (Array.isArray((object as { geometries?: unknown }).geometries) ? (object as { geometries: unknown[] }).geometries : [])
    : [object];
  const bad = (index: unknown): boolean => {
    if (typeof index !== 'number' || !Number.isInteger(index)) return true;
    const arc = index >= 0 ? index : ~index;
    return arc >= arcCount;
  };
  const firstBad = (v: unknown): unknown => {
    if (Array.isArray(v)) {
      for (const x of v) {
        const hit = firstBad(x);
        if (hit !== undefined) return hit;
      }
      return undefined;
    }
    return bad(v) ? v : undefined;
  };
  geometries.forEach((g, k) => {
    const geom = g as { type?: unknown; arcs?: unknown; id?: unknown; properties?: unknown };
    if (!geom || typeof geom !== 'object' || geom.arcs === undefined) return;
    const hit = firstBad(geom.arcs);
    if (hit === undefined) return;
    const id = geom.id !== undefined ? ` (id ${JSON.stringify(geom.id)})` : '';
    const shown = typeof hit === 'number' ? String(hit) : JSON.stringify(hit);
    throw new InputError(
      `${file}: object "${name}", feature ${k + 1}${id} refers to arc ${shown}, but ` +
        (arcCount === 0 ? 'the topology has no arcs' : `the topology has ${arcCount} arc${arcCount === 1 ? '' : 's'} (indexes 0 to ${arcCount - 1}, or -1 to ${-arcCount} for an arc reversed)`) +
        '. The file is damaged or was cut; export it again.',
      { file, feature: String(k + 1) },
    );
  });
}
