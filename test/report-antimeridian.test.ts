// Maps of longitude/latitude areas on both sides of the 180° meridian, and the neighbours of such
// areas built directly or by a run. Fixtures: the invented Tarrow Isles (test/fixtures/geo/
// isles-across-180.geojson: eight rectangular districts from 174°E to 171°W, one of them cut at
// ±180° into two parts), whose drawn widths follow from their corners by hand; and the us-atlas
// 3.0.1 counties (US Census Bureau cartographic boundaries, TopoJSON), whose Aleutian counties reach
// past 180° to about 172.4°E while the rest of Alaska lies west of it, and which also hold Guam and
// the Northern Mariana Islands (144.6°E to 146.1°E) and the territories in the Caribbean (to
// 64.6°W): extents read from the file itself.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { feature } from 'topojson-client';
import type { GeometryCollection, Topology } from 'topojson-specification';
import type { AreaGeometry } from '../src/geo/types.js';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { buildWeights, type SpatialWeights, type WeightsSpec } from '../src/weights/index.js';
import { runAnalysis } from '../src/pipeline/index.js';
import { buildReport, choroplethSvg } from '../src/report/index.js';
import { fitFrame, longitudeCut } from '../src/report/pictures/projection.js';

const ROOT = join(import.meta.dirname, '..');
const ISLES = join(ROOT, 'test/fixtures/geo/isles-across-180.geojson');
const islesFile = () => ({ name: 'isles-across-180.geojson', bytes: new Uint8Array(readFileSync(ISLES)) });

async function isles(): Promise<AreaGeometry[]> {
  const layer = await readBoundary([islesFile()], { coordinates: 'geographic' });
  return layer.areas.map((a) => a.geometry!);
}

/** Every x coordinate of the SVG's paths (M/L pairs), in pixels. */
function pathXs(svg: string): number[] {
  const xs: number[] = [];
  for (const d of svg.matchAll(/ d="([^"]+)"/g)) for (const m of d[1].matchAll(/[ML](-?[\d.]+) -?[\d.]+/g)) xs.push(Number(m[1]));
  return xs;
}

describe('maps of areas on both sides of the 180° meridian', () => {
  it('are cut where no area lies, so the isles sit together: the map is as wide as 17° of longitude, not 345°', async () => {
    const geoms = await isles();
    const cut = longitudeCut(geoms)!;
    // the widest stretch no district covers runs from 171°W east to 174°E
    expect(cut).toBeGreaterThan(-171);
    expect(cut).toBeLessThan(174);
    const frame = fitFrame(geoms, 'geographic', 520, 520);
    expect(frame.longitudeCut).toBe(cut);
    // the districts on the two sides of 180° meet there on the map
    expect(frame.x(180, -15)).toBeCloseTo(frame.x(-180, -15), 9);
    // 174°E to 171°W is 15° of longitude; latitudes −18° to −14°. Shrunk by cos 16°, the width is
    // 15 × cos 16° = 14.42 degrees' worth against 4 tall: the 508-pixel width limits the scale
    const s = 508 / (15 * Math.cos((16 * Math.PI) / 180));
    expect(frame.scale).toBeCloseTo(s, 9);
    expect(frame.width).toBe(Math.ceil(15 * Math.cos((16 * Math.PI) / 180) * s + 12));
    expect(frame.height).toBe(Math.ceil(4 * s + 12));
    expect(frame.x(174, -15)).toBeCloseTo(6, 9);
    expect(frame.x(-171, -15)).toBeCloseTo(frame.width - 6, 6);
  });

  it('draws every district inside the map and says how it was cut, in the picture and on the Summary sheet', async () => {
    const geoms = await isles();
    const pic = choroplethSvg({ title: 'delay_days by area', valueName: 'delay_days', geometries: geoms, values: [1, 2, 3, 4, 5, 6, 7, 8], coordinates: 'geographic', scale: 'sequential' });
    const xs = pathXs(pic.svg);
    expect(xs.length).toBeGreaterThan(30);
    const frame = fitFrame(geoms, 'geographic', 520, 520);
    for (const x of xs) {
      expect(x).toBeGreaterThanOrEqual(5.9);
      expect(x).toBeLessThanOrEqual(frame.width - 5.9);
    }
    expect(pic.drawingNote).toMatch(/both sides of the 180° meridian, so the maps are drawn across it: longitudes west of [\d.]+° [EW] are moved 360° east/);
    expect(pic.alt).toContain(pic.drawingNote!);

    const result = await runAnalysis({
      boundary: [islesFile()], coordinates: 'geographic', id: 'isle_id', y: 'delay_days', x: ['harbour_km'],
      weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
    });
    const summary = buildReport(result).sheets.find((sh) => sh.role === 'overview')!;
    const notes = summary.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
    expect(notes).toMatch(/Pictures below\. .*both sides of the 180° meridian/);
  });

  it('leaves maps that do not reach 180° as the file has them', async () => {
    const sids = ['sids.shp', 'sids.shx', 'sids.dbf'].map((f) => ({ name: f, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/sids', f))) }));
    const nc = (await readBoundary(sids)).areas.map((a) => a.geometry!);
    expect(longitudeCut(nc)).toBeNull();
    expect(fitFrame(nc, 'geographic', 520, 520).longitudeCut).toBeUndefined();
    // areas round the whole world, with the widest empty stretch across 180°: nothing moves
    // (gaps of 70°, 70°, 60° and, from 120°E to 120°W, 120°)
    const square = (x: number): AreaGeometry => ({ kind: 'polygon', polygons: [[[[x, 0], [x + 10, 0], [x + 10, 10], [x, 10], [x, 0]]]] });
    expect(longitudeCut([square(-120), square(-40), square(40), square(110)])).toBeNull();
    // projected coordinates are never moved, whatever their numbers
    const isl = await isles();
    expect(fitFrame(isl, 'projected', 520, 520).longitudeCut).toBeUndefined();
  });

  it('the us-atlas counties: the Aleutians sit beside the rest of Alaska, and the map spans 151° from Guam to the Virgin Islands instead of the whole world', () => {
    const topology = JSON.parse(readFileSync(join(ROOT, 'node_modules/us-atlas/counties-10m.json'), 'utf8')) as Topology;
    const fc = feature(topology, topology.objects.counties as GeometryCollection) as unknown as { features: { id: string; geometry: { type: string; coordinates: number[][][] | number[][][][] } | null }[] };
    const drawn = fc.features.filter((f) => f.geometry);
    const geoms: AreaGeometry[] = drawn.map((f) => ({
      kind: 'polygon',
      polygons: f.geometry!.type === 'Polygon' ? [f.geometry!.coordinates as number[][][]] : (f.geometry!.coordinates as number[][][][]),
    }));
    const frame = fitFrame(geoms, 'geographic', 520, 520);
    const cut = frame.longitudeCut!;
    // the widest stretch no county covers runs from 64.6°W east to 144.6°E: the cut is in it
    expect(cut).toBeGreaterThan(-64.6);
    expect(cut).toBeLessThan(144.6);
    const extent = (which: (id: string) => boolean) => {
      let lo = Infinity, hi = -Infinity;
      drawn.forEach((f, i) => {
        if (!which(String(f.id))) return;
        const g = geoms[i];
        if (g.kind === 'polygon') for (const p of g.polygons) for (const r of p) for (const [x] of r) {
          const lon = x < cut ? x + 360 : x;
          lo = Math.min(lo, lon); hi = Math.max(hi, lon);
        }
      });
      return { lo, hi };
    };
    const all = extent(() => true);
    expect(all.lo).toBeCloseTo(144.62, 1);
    expect(all.hi - all.lo).toBeGreaterThan(150);
    expect(all.hi - all.lo).toBeLessThan(151.5);
    // Alaska (state code 02): from the Aleutians at about 172.4°E across 180° to 130°W, about 58° and not 359°
    const alaska = extent((id) => id.startsWith('02'));
    expect(alaska.lo).toBeGreaterThan(172);
    expect(alaska.lo).toBeLessThan(173);
    expect(alaska.hi - alaska.lo).toBeLessThan(60);
  });
});

describe('neighbours of areas on both sides of 180°: a direct call and a run agree', () => {
  /** Directed edges in row order, as a run reports them. */
  const edgesOf = (w: SpatialWeights) => {
    const out: [number, number, number][] = [];
    for (let i = 0; i < w.n; i++) for (let k = w.rowPtr[i]; k < w.rowPtr[i + 1]; k++) out.push([i, w.colIdx[k], w.values[k]]);
    return out;
  };
  const rules: { name: string; spec: WeightsSpec; link?: boolean }[] = [
    { name: '2 nearest', spec: { method: 'knn', k: 2 } },
    { name: 'a 400 km band', spec: { method: 'band', distance: 400 } },
    { name: 'inverse distance within 700 km', spec: { method: 'idw', power: 1, cutoff: 700 } },
    { name: 'rook, areas without neighbours linked', spec: { method: 'rook' }, link: true },
  ];
  for (const rule of rules) {
    it(`${rule.name}: buildWeights without points gives the run's neighbours (area-weighted centroids with ±180° handled)`, async () => {
      const layer = await readBoundary([islesFile()], { coordinates: 'geographic' });
      const ids = layer.areas.map((a) => String(a.properties.isle_id));
      const geometries = layer.areas.map((a) => a.geometry!);
      const direct = buildWeights({ ids, geometries, coordinates: 'geographic' }, rule.spec, { transform: 'row', linkUnneighboured: rule.link });
      const run = await runAnalysis({
        boundary: [islesFile()], coordinates: 'geographic', id: 'isle_id', y: 'delay_days', x: ['harbour_km'],
        weights: rule.spec, transform: 'row', linkUnneighboured: rule.link, models: ['ols'], permutations: 0,
      });
      expect(run.ids).toEqual(ids);
      const e = run.weights.edges;
      expect(edgesOf(direct)).toEqual(Array.from(e.from, (f, k) => [f, e.to[k], e.weight[k]]));
      // and the same as handing the run's points over explicitly
      const withPoints = buildWeights({ ids, geometries, coordinates: 'geographic', points: representativePoints(geometries) }, rule.spec, { transform: 'row', linkUnneighboured: rule.link });
      expect(edgesOf(withPoints)).toEqual(edgesOf(direct));
    });
  }

  it('the district cut at ±180° finds its nearest districts on both sides of 180°, by great-circle distance between centroids', async () => {
    const layer = await readBoundary([islesFile()], { coordinates: 'geographic' });
    const ids = layer.areas.map((a) => String(a.properties.isle_id));
    const geometries = layer.areas.map((a) => a.geometry!);
    const w = buildWeights({ ids, geometries, coordinates: 'geographic' }, { method: 'knn', k: 2 });
    const straddle = ids.indexOf('TI-03');
    const near = Array.from(w.colIdx.subarray(w.rowPtr[straddle], w.rowPtr[straddle + 1]), (j) => ids[j]).sort();
    // its centroid by hand: parts 179..180 (2 square degrees, centre 179.5) and 180..182 (4, centre 181):
    // (2 × 179.5 + 4 × 181) / 6 = 180.5, i.e. 179.5°W, 17°S; the other districts' centres are their
    // rectangles' middles. The two nearest by the haversine formula (Sinnott 1984, recalled from memory):
    const centre: Record<string, [number, number]> = {
      'TI-01': [175.5, -15], 'TI-02': [178.5, -15], 'TI-04': [-178.5, -15], 'TI-05': [-175.5, -15],
      'TI-06': [-172.5, -17], 'TI-07': [176.5, -17], 'TI-08': [-176.5, -17],
    };
    const rad = Math.PI / 180;
    const km = ([l1, p1]: [number, number], [l2, p2]: [number, number]) =>
      2 * 6371.0088 * Math.asin(Math.sqrt(Math.sin(((p2 - p1) * rad) / 2) ** 2 + Math.cos(p1 * rad) * Math.cos(p2 * rad) * Math.sin(((l2 - l1) * rad) / 2) ** 2));
    const byDistance = Object.keys(centre).sort((a, b) => km([-179.5, -17], centre[a]) - km([-179.5, -17], centre[b]));
    expect(near).toEqual(byDistance.slice(0, 2).sort());
    // one on each side of 180°: Kessa East (178.5°E) and Orra North (178.5°W)
    expect(near).toEqual(['TI-02', 'TI-04']);
  });
});
