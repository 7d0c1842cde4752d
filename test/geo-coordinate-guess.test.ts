// Coordinates the file does not state. Sources: the wheat field-trial lattice and the Columbus
// neighbourhoods (test/fixtures/wheat and test/fixtures/columbus, CC0, see their LICENCE.md), both in
// planar units within ±180/±90 as their documentation says; hand-made lattices whose cell shapes
// follow from the definition of a degree of longitude (cos(latitude) of a degree of latitude on a
// sphere). The rule under test is stated in src/geo/coordinate-guess.ts and the README.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readBoundary } from '../src/geo/index.js';
import { runAnalysis } from '../src/pipeline/index.js';
import { buildReport } from '../src/report/index.js';
import { fakeResult } from './helpers/fake-result.js';

const set = (dir: string, base: string) => ['shp', 'dbf'].map((ext) => ({
  name: `${base}.${ext}`, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/${dir}/${base}.${ext}`, import.meta.url))),
}));

/** A GeoJSON lattice of rows × cols cells, w wide and h tall, from (x0, y0), with no crs member; value = row + col. */
function lattice(x0: number, y0: number, w: number, h: number, rows = 5, cols = 6) {
  const features = [];
  for (let r = 0; r < rows; r++) for (let c = 0; c < cols; c++) {
    const a = x0 + c * w, b = y0 + r * h;
    features.push({
      type: 'Feature', properties: { code: `C${r}${c}`, v: (r * 7 + c * 3) % 5 + r, u: c },
      geometry: { type: 'Polygon', coordinates: [[[a, b], [a + w, b], [a + w, b + h], [a, b + h], [a, b]]] },
    });
  }
  return [{ name: 'cells.geojson', bytes: new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features })) }];
}

describe('coordinates the file does not state', () => {
  it('wheat plots: small ranges and shapes that fit the plane, so projected — and it says it guessed', async () => {
    const layer = await readBoundary(set('wheat', 'wheat'));
    expect(layer.coordinates).toBe('projected');
    expect(layer.coordinatesGuessed).toBe(true);
    const warning = layer.warnings.find((w) => /does not say what its coordinates are/.test(w));
    expect(warning).toMatch(/taken as planar \(projected\) units\. This is a guess/);
    expect(warning).toMatch(/--coordinates geographic/);
    expect(warning).toMatch(/Coordinates choice under Areas in the sidebar/);
    expect(layer.coordinateEvidence).toMatch(/^wheat\.shp comes without a \.prj file\. Guessed/);
  });

  it('a lattice of 1° × 0.75° cells at 40–44°N (square on the ground) stays longitude/latitude, guessed', async () => {
    // ground width of a cell: 1° · cos 42° ≈ 0.74 of a degree of latitude, about as tall (0.75°)
    const layer = await readBoundary(lattice(10, 40, 1, 0.75));
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinatesGuessed).toBe(true);
    expect(layer.warnings.join(' ')).toMatch(/taken as longitude\/latitude degrees .*This is a guess.*--coordinates projected/);
  });

  it('the same numbers as square cells (as wide as tall in the file) read as projected', async () => {
    const layer = await readBoundary(lattice(10, 40, 1, 1));
    expect(layer.coordinates).toBe('projected');
    expect(layer.coordinatesGuessed).toBe(true);
  });

  it('negative coordinates are not a small local grid: longitude/latitude, still said to be a guess', async () => {
    const layer = await readBoundary(lattice(-80, 40, 1, 1));
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinatesGuessed).toBe(true);
    expect(layer.coordinateEvidence).toMatch(/not every coordinate lies between 0 and 90/);
  });

  it('Columbus near the equator of its numbers: shapes cannot tell, read as degrees with the warning', async () => {
    // y ≈ 11..15, where a degree of longitude is within 3 % of a degree of latitude
    const layer = await readBoundary(set('columbus', 'columbus'));
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinatesGuessed).toBe(true);
    expect(layer.warnings.join(' ')).toMatch(/--coordinates projected/);
  });

  it('a stated kind is not a guess: no warning', async () => {
    const layer = await readBoundary(lattice(10, 40, 1, 1), { coordinates: 'geographic' });
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinatesGuessed).toBeUndefined();
    expect(layer.warnings.join(' ')).not.toMatch(/does not say/);
  });

  it('the run carries the guess into its warnings, the JSON and the Summary sheet', async () => {
    const result = await runAnalysis({ boundary: lattice(10, 40, 1, 1), id: 'code', y: 'v', x: ['u'], weights: { method: 'knn', k: 4 }, transform: 'row', models: ['ols'], permutations: 0 });
    expect(result.coordinatesGuessed).toBe(true);
    expect(result.warnings.join(' ')).toMatch(/This is a guess/);
    const summary = buildReport(result).sheets.find((s) => s.name === 'Summary')!;
    const text = JSON.stringify(summary.blocks);
    expect(text).toMatch(/projected \(planar units\), guessed: the file does not say/);
    expect(text).toMatch(/--coordinates geographic/);
    // a stated kind shows no "guessed"
    const stated = JSON.stringify(buildReport(fakeResult()).sheets.find((s) => s.name === 'Summary')!.blocks);
    expect(stated).not.toMatch(/guessed/);
  });
});
