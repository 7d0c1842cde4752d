import type { AreaGeometry, CoordinateKind } from '../geo/types.js';
import { representativePoints } from '../geo/index.js';
import { InputError } from '../errors.js';
import type { PointSet } from './nearest.js';
import { formatCount } from '../core/count.js';

export interface WeightsInput {
  ids: string[];
  geometries: AreaGeometry[];
  coordinates: CoordinateKind;
  /**
   * One representative point per area, for the distance rules (and contiguity's areas without
   * neighbours); when absent, the areas' own representative points (area-weighted centroids).
   */
  points?: { x: Float64Array; y: Float64Array };
}

/** Checks the IDs: at least two areas, none blank, none repeated. */
export function checkIds(ids: string[]): void {
  if (ids.length < 2) {
    throw new InputError(`Spatial weights need at least two areas; there ${ids.length === 1 ? 'is only one' : 'are none'}.`);
  }
  const seen = new Map<string, number>();
  ids.forEach((id, i) => {
    if (id === '' || id == null) throw new InputError(`Area ${i + 1} has a blank ID. Give every area an ID.`, { feature: i + 1 });
    const before = seen.get(id);
    if (before !== undefined) {
      throw new InputError(`The ID ${id} is used by areas ${before + 1} and ${i + 1}. IDs must be unique.`, { feature: id });
    }
    seen.set(id, i);
  });
}

/**
 * The areas' points, checked: one per area, finite, and plausible longitudes/latitudes when
 * geographic. The caller's points when given, else the same area-weighted centroids (with their
 * ±180° handling), never box centres, whose longitude is near 0 for an area straddling the antimeridian.
 */
export function checkedPoints(input: WeightsInput, method: string): PointSet {
  const n = input.ids.length;
  const p = input.points ?? representativePoints(input.geometries);
  if (p.x.length !== n || p.y.length !== n) {
    throw new InputError(`There are ${formatCount(n)} areas but ${formatCount(p.x.length)} representative points; every area needs exactly one.`);
  }
  const greatCircle = input.coordinates === 'geographic';
  for (let i = 0; i < n; i++) {
    const x = p.x[i], y = p.y[i];
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      throw new InputError(`Area ${input.ids[i]} has no usable location (${x}, ${y}). Check its geometry.`, { feature: input.ids[i] });
    }
    if (greatCircle && (Math.abs(y) > 90 || Math.abs(x) > 540)) {
      throw new InputError(
        `Area ${input.ids[i]} is at (${x}, ${y}), which is not a longitude/latitude. ` +
          `If the boundary file is projected, say so and distances will be measured in its units.`,
        { feature: input.ids[i] },
      );
    }
  }
  if (greatCircle && p.x.some((x) => x < -180 || x > 180)) {
    // the spherical search works on longitudes in [−180°, 180°]
    const x = p.x.map((v) => ((((v + 180) % 360) + 360) % 360) - 180);
    return { x, y: p.y, greatCircle };
  }
  return { x: p.x, y: p.y, greatCircle };
}

/** Plain number for messages: six significant digits, no trailing zeros. */
export function plain(x: number): string {
  return String(Number(x.toPrecision(6)));
}

export function distanceUnit(pts: PointSet): string {
  return pts.greatCircle ? 'km' : 'coordinate units';
}
