// The outputs beside the workbook (issue 16 §2): --out-geojson and --pictures. Sources: RFC 7946 (the
// GeoJSON format: FeatureCollection, closed linear rings of four or more positions, exterior rings
// counter-clockwise and holes clockwise), the Columbus figures of the independent numpy reference
// (test/golden/columbus.json) through the identities residual = y − Xβ and, for the lag model,
// residual = y − ρWy − Xβ; the PNG signature (ISO/IEC 15948).
import { afterAll, describe, expect, it } from 'vitest';
import { copyFileSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { openDbf } from 'shapefile';
import { runCli, ROOT, STACK_LINE } from './helpers/cli.js';
import { readGolden } from './helpers/columbus.js';

const COLUMBUS = join(ROOT, 'test/fixtures/columbus/columbus.shp');
const golden = readGolden();
const dir = mkdtempSync(join(tmpdir(), 'spillway-extras-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function dbfRows(): Promise<Record<string, number>[]> {
  const source = await openDbf(join(ROOT, 'test/fixtures/columbus/columbus.dbf'));
  const rows: Record<string, number>[] = [];
  for (let r = await source.read(); !r.done; r = await source.read()) rows.push(r.value as Record<string, number>);
  return rows;
}

/** Twice the signed area of a ring (positive: counter-clockwise). */
const area2 = (ring: number[][]) => ring.slice(0, -1).reduce((s, p, i) => s + p[0] * ring[i + 1][1] - ring[i + 1][0] * p[1], 0);

describe('spillway fit --out-geojson and --pictures on Columbus', () => {
  const geojson = join(dir, 'columbus-areas.geojson');
  const pictures = join(dir, 'pictures');
  // stated projected (the file does not say): shared borders and the models do not depend on it
  const run = runCli(['fit', '--boundary', COLUMBUS, '--coordinates', 'projected', '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC,HOVAL', '--weights', 'queen',
    '--local', 'moran', '--out-geojson', geojson, '--pictures', pictures, '--threads', '1']);

  it('exits 0 and names the files it wrote', () => {
    expect(run.code, run.stderr).toBe(0);
    expect(run.stdout).toContain(`Areas with results (GeoJSON): ${geojson}`);
    expect(run.stderr).toMatch(/pictures in .*map-of-the-outcome\.svg/);
    // projected coordinates are written as they came, and that is said
    expect(run.stderr).toMatch(/projected, not longitude\/latitude/);
  });

  it('writes an RFC 7946 FeatureCollection: one feature per area, closed rings of four or more positions, exterior counter-clockwise, holes clockwise', () => {
    const fc = JSON.parse(readFileSync(geojson, 'utf8'));
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features).toHaveLength(49);
    for (const f of fc.features) {
      expect(f.type).toBe('Feature');
      expect(['Polygon', 'MultiPolygon']).toContain(f.geometry.type);
      const polygons: number[][][][] = f.geometry.type === 'Polygon' ? [f.geometry.coordinates] : f.geometry.coordinates;
      for (const rings of polygons) {
        rings.forEach((ring, k) => {
          expect(ring.length).toBeGreaterThanOrEqual(4);
          expect(ring[0]).toEqual(ring[ring.length - 1]);
          expect(Math.sign(area2(ring)), `feature ${f.properties.POLYID} ring ${k}`).toBe(k === 0 ? 1 : -1);
        });
      }
    }
  });

  it('carries each area’s results under plain names, equal to the reference through residual = y − Xβ and y − ρWy − Xβ', async () => {
    const fc = JSON.parse(readFileSync(geojson, 'utf8'));
    const rows = await dbfRows();
    const ols = golden.ols.coefficients.map((c: { estimate: number }) => c.estimate);
    const lag = golden.lag.coefficients.map((c: { estimate: number }) => c.estimate);
    const nbs = golden.weights.neighbours as number[][];
    fc.features.forEach((f: { properties: Record<string, number | string> }, i: number) => {
      const p = f.properties;
      const r = rows[i];
      expect(p.POLYID).toBe(String(r.POLYID));
      expect(p.CRIME).toBeCloseTo(r.CRIME, 10);
      expect(p.neighbour_count).toBe(nbs[i].length);
      expect(p.plain_regression_residual as number).toBeCloseTo(r.CRIME - ols[0] - ols[1] * r.INC - ols[2] * r.HOVAL, 6);
      const wy = nbs[i].reduce((s, j) => s + rows[j].CRIME, 0) / nbs[i].length;
      expect(p.spatial_lag_residual as number).toBeCloseTo(r.CRIME - golden.lag.rho * wy - lag[0] - lag[1] * r.INC - lag[2] * r.HOVAL, 5);
      expect(typeof p.local_moran_group).toBe('string');
      for (const key of ['spatial_error_residual', 'local_moran', 'local_moran_p']) expect(typeof p[key], key).toBe('number');
    });
  });

  it('writes every map and plot as an SVG and a PNG', () => {
    const names = readdirSync(pictures).sort();
    for (const stem of ['map-of-the-outcome', 'map-of-residuals', 'moran-scatter-plot', 'map-of-local-groups']) {
      expect(names).toContain(`${stem}.svg`);
      expect(names).toContain(`${stem}.png`);
      expect(readFileSync(join(pictures, `${stem}.svg`), 'utf8')).toMatch(/^<svg[\s>]/);
      expect([...readFileSync(join(pictures, `${stem}.png`)).subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    }
  });
});

describe('the extra outputs never overwrite an input', () => {
  it('refuses --out-geojson naming the boundary file, which stays as it was', () => {
    const boundary = join(dir, 'districts.geojson');
    copyFileSync(join(ROOT, 'sample-workbooks/vell-basin-districts.geojson'), boundary);
    const before = readFileSync(boundary);
    const r = runCli(['fit', '--boundary', boundary, '--data', join(ROOT, 'sample-workbooks/vell-basin.xlsx'), '--id', 'district_id', '--y', 'long_commute_pct', '--x', 'broadband_pct',
      '--models', 'ols', '--out-geojson', boundary, '--threads', '1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--out-geojson ".*" is the same file as the --boundary file/);
    expect(r.stderr).not.toMatch(STACK_LINE);
    expect(readFileSync(boundary).equals(before)).toBe(true);
  });

  it('refuses an --out-geojson name that is not .geojson or .json, and a --pictures path that is a file', () => {
    expect(runCli(['fit', '--boundary', COLUMBUS, '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC', '--out-geojson', join(dir, 'areas.txt')]).stderr).toMatch(/--out-geojson must name a \.geojson/);
    const r = runCli(['fit', '--boundary', COLUMBUS, '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC', '--models', 'ols', '--pictures', join(ROOT, 'package.json'), '--threads', '1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/is a file, not a folder/);
    expect(existsSync(join(ROOT, 'package.json'))).toBe(true);
  });
});
