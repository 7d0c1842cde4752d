/** Decides whether a layer's coordinates are longitude/latitude degrees or planar (projected) units. */
import { InputError } from '../errors.js';
import type { Area, CoordinateKind } from './types.js';
import { shapesLookPlanar } from './coordinate-guess.js';
import type { Bounds } from './features-to-areas.js';

/** The length unit of projected coordinates, when the file states it. */
export type LinearUnit = 'metre' | 'foot' | 'us-foot';

/** What the file itself says about its coordinate system (.prj text or a GeoJSON `crs` member). */
export interface CoordinateClaim {
  kind: CoordinateKind;
  /** e.g. ".prj names GEOGCS \"GCS_WGS_1984\"" */
  says: string;
  /** projected coordinates: their length unit, when stated */
  unit?: LinearUnit;
}

/** The unit of a WKT's last UNIT or LENGTHUNIT (the projected one: a GEOGCS inside comes first). */
export function unitFromWkt(text: string): LinearUnit | undefined {
  const units = [...text.matchAll(/(?:LENGTH)?UNIT\s*\[\s*"([^"]*)"\s*,\s*([0-9.eE+-]+)/gi)];
  const last = units[units.length - 1];
  if (!last) return undefined;
  const [name, factor] = [last[1].toLowerCase(), Number(last[2])];
  if (/us|survey/.test(name) && /f(oo|ee)t/.test(name)) return 'us-foot';
  if (/f(oo|ee)t/.test(name)) return 'foot';
  if (/met(er|re)/.test(name) || factor === 1) return 'metre';
  return undefined;
}

export interface CoordinateDecision {
  coordinates: CoordinateKind;
  /** projected coordinates whose unit the file states */
  unit?: LinearUnit;
  coordinateEvidence: string;
  /** neither the file nor the analyst said: the kind was guessed from the ranges and shapes */
  guessed: boolean;
  warnings: string[];
}

/** Reads the kind from WKT in a .prj file (old GEOGCS/PROJCS keywords or their newer equivalents). */
export function claimFromPrj(text: string, prjName: string): CoordinateClaim | null {
  const t = text.trim().replace(/^\uFEFF/, '');
  const m = /^([A-Z]+)\s*\[\s*"([^"]*)"/i.exec(t);
  if (!m) return null;
  const keyword = m[1].toUpperCase();
  const name = m[2];
  if (keyword === 'PROJCS' || keyword === 'PROJCRS' || keyword === 'PROJECTEDCRS') {
    const unit = unitFromWkt(t);
    return { kind: 'projected', says: `${prjName} describes a projected system (${keyword} "${name}")`, ...(unit ? { unit } : {}) };
  }
  if (keyword === 'GEOGCS' || keyword === 'GEOGCRS' || keyword === 'GEODCRS' || keyword === 'GEOGRAPHICCRS') {
    return { kind: 'geographic', says: `${prjName} describes a longitude/latitude system (${keyword} "${name}")` };
  }
  return null;
}

/** Common longitude/latitude EPSG codes (WGS 84, NAD83, NAD27, ETRS89, GDA94/2020, NZGD2000, JGD2000/2011,
 *  SIRGAS 2000, CGCS2000, ED50). Recalled from memory; any other code is taken as projected. */
const GEOGRAPHIC_EPSG = new Set([4326, 4269, 4267, 4258, 4283, 7844, 4167, 4612, 6668, 4674, 4490, 4230, 4979, 4617]);

/** Projected EPSG codes in metres: UTM zones on WGS 84 and ETRS89, web Mercator, and a few national grids
 *  (Europe's equal-area grid, British, New Zealand, Australian, US equal-area, French, Dutch, Belgian).
 *  Recalled from memory; any other code leaves the unit unstated. */
function epsgInMetres(code: number): boolean {
  return (code >= 32601 && code <= 32660) || (code >= 32701 && code <= 32760) || (code >= 25828 && code <= 25838) ||
    [3857, 3395, 3035, 27700, 2193, 3577, 5070, 2154, 28992, 31370].includes(code);
}

/** Reads the (pre-2016) GeoJSON `crs` member: {"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::4326"}}. */
export function claimFromGeoJsonCrs(root: unknown, file: string): CoordinateClaim | null {
  if (!root || typeof root !== 'object') return null;
  const crs = (root as { crs?: { type?: unknown; properties?: { name?: unknown } } }).crs;
  const name = crs?.properties?.name;
  if (typeof name !== 'string') return null;
  if (/CRS(84|83|27)$/i.test(name)) return { kind: 'geographic', says: `${file}'s crs member names ${name} (longitude/latitude)` };
  const m = /EPSG:{1,2}(?:[\d.]*:)?(\d+)$/i.exec(name);
  if (!m) return null;
  const code = Number(m[1]);
  return GEOGRAPHIC_EPSG.has(code)
    ? { kind: 'geographic', says: `${file}'s crs member names EPSG:${code} (longitude/latitude)` }
    : { kind: 'projected', says: `${file}'s crs member names EPSG:${code}, not one of the common longitude/latitude codes`, ...(epsgInMetres(code) ? { unit: 'metre' as const } : {}) };
}

/**
 * Spillway's own statement in a GeoJSON file it wrote (the demo's boundaries):
 * "spillway:coordinates": "projected metres, ..." or "geographic ...".
 */
export function claimFromOwnMember(root: unknown, file: string): CoordinateClaim | null {
  if (!root || typeof root !== 'object') return null;
  const said = (root as Record<string, unknown>)['spillway:coordinates'];
  if (typeof said !== 'string') return null;
  const t = said.toLowerCase();
  if (t.startsWith('geographic')) return { kind: 'geographic', says: `${file} states "${said}"` };
  if (!t.startsWith('projected')) return null;
  const unit: LinearUnit | undefined = /met(er|re)s?\b/.test(t) ? 'metre' : /\bf(oo|ee)t\b/.test(t) ? 'foot' : undefined;
  return { kind: 'projected', says: `${file} states "${said}"`, ...(unit ? { unit } : {}) };
}

const SLACK = 1e-9;

/** A coordinate for a sentence: whole units once they run past 10,000 (metres, feet), else six digits without trailing zeros. */
function fmt(v: number): string {
  if (Number.isInteger(v) || Math.abs(v) >= 1e4) return String(Math.round(v));
  return String(Number(v.toPrecision(6)));
}

/**
 * Combines the file's own claim (if any) with the coordinate ranges. An explicit `override` from the
 * analyst wins but is still checked against the ranges for the impossible case (degrees beyond ±180/±90).
 * With neither, coordinates within ±180/±90 are guessed from the ranges and the areas' shapes
 * (coordinate-guess.ts states the rule), and a warning says it was a guess.
 */
export function decideCoordinates(
  b: Bounds,
  claim: CoordinateClaim | null,
  file: string,
  override?: CoordinateKind,
  areas: Area[] = [],
): CoordinateDecision {
  const span = `x runs ${fmt(b[0])} to ${fmt(b[2])}, y runs ${fmt(b[1])} to ${fmt(b[3])}`;
  const xIsLon = b[0] >= -180 - SLACK && b[2] <= 180 + SLACK;
  const xIsLon360 = b[0] >= -SLACK && b[2] <= 360 + SLACK;
  const yIsLat = b[1] >= -90 - SLACK && b[3] <= 90 + SLACK;
  const looksSwapped = b[0] >= -90 - SLACK && b[2] <= 90 + SLACK && !yIsLat && b[1] >= -180 - SLACK && b[3] <= 180 + SLACK;
  const warnings: string[] = [];
  const stated = override
    ? { kind: override, says: `the analyst chose ${override} coordinates` }
    : claim;

  if (stated?.kind !== 'projected' && looksSwapped) {
    throw new InputError(
      `${file}: ${span}. Values beyond ±90 in y but within ±90 in x suggest latitude and longitude are swapped; ` +
        'GeoJSON and shapefiles put longitude (x) first. Swap the coordinates, or say the coordinates are projected.',
      { file },
    );
  }
  if (stated?.kind === 'geographic') {
    if (!(yIsLat && (xIsLon || xIsLon360))) {
      throw new InputError(
        `${file}: ${stated.says}, but ${span}, far beyond longitude/latitude degrees. ` +
          'The coordinate description probably belongs to another file or was not updated after reprojection; ' +
          'fix or remove it.',
        { file },
      );
    }
    return { coordinates: 'geographic', coordinateEvidence: `${stated.says}; ${span}.`, guessed: false, warnings };
  }
  if (stated?.kind === 'projected') {
    if (xIsLon && yIsLat) {
      warnings.push(`${file}: ${stated.says}, yet every coordinate lies within ±180/±90; check that this is right.`);
    }
    return { coordinates: 'projected', ...(stated.unit ? { unit: stated.unit } : {}), coordinateEvidence: `${stated.says}; ${span}.`, guessed: false, warnings };
  }
  if (xIsLon && yIsLat) {
    const look = shapesLookPlanar(areas, b);
    const kind = look.planar ? 'projected' : 'geographic';
    const taken = look.planar ? 'planar (projected) units' : 'longitude/latitude degrees (distances on the sphere)';
    const other = look.planar ? 'geographic' : 'projected';
    warnings.push(
      `${file}: the file does not say what its coordinates are; they were taken as ${taken}. This is a guess: ${span}, ` +
        `all within ±180/±90, and ${look.reason}. If it is wrong, say which: --coordinates ${other} on the command line, ` +
        'or the Coordinates choice under Areas in the sidebar.',
    );
    return {
      coordinates: kind,
      coordinateEvidence: `Guessed, no coordinate system is stated; ${span}, all within ±180/±90, and ${look.reason}, so they are read as ${taken}.`,
      guessed: true,
      warnings,
    };
  }
  return {
    coordinates: 'projected',
    coordinateEvidence: `No coordinate system is stated; ${span}, beyond longitude/latitude ranges, so they are read as planar units.`,
    guessed: false,
    warnings,
  };
}
