// Edge lists: an invented fixture read as given, a round trip parsed back with papaparse (a
// general-purpose CSV library), and bad lines named by number (the project's input-error rule:
// file, line and what to do).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { thrown } from './helpers/input-error.js';
import { buildWeights, readEdgeList, summarizeWeights, writeEdgeList } from '../src/weights/index.js';
import { row, squareGrid } from './fixtures/weights/shapes.js';

// Invented areas (test/fixtures/weights/invented-links.csv): three places in an invented valley.
const places = ['North Vale', 'Marsh, East', 'Hollow', 'Dry Fork "Upper"'];
const fixture = readFileSync('test/fixtures/weights/invented-links.csv', 'utf8');

const message = (f: () => unknown): string => thrown(f).message;

describe('reading edge lists', () => {
  it('reads the fixture as given: links, weights, quoted IDs, no neighbours for the unlisted area', () => {
    const w = readEdgeList(fixture, places, { transform: 'as given', source: 'invented-links.csv' });
    expect(row(w, 0)).toEqual([1, 2]);
    expect(Array.from(w.values.subarray(w.rowPtr[0], w.rowPtr[1]))).toEqual([0.5, 2]);
    expect(row(w, 2)).toEqual([0, 1]);
    expect(summarizeWeights(w).withoutNeighbours).toEqual(['Dry Fork "Upper"']);
    expect(w.spec).toEqual({ method: 'edge-list', source: 'invented-links.csv' });
    expect(w.symmetricBase).toBeNull(); // Hollow → Marsh, East has no reverse link
  });

  it('row-standardises by default', () => {
    const w = readEdgeList(fixture, places);
    expect(w.transform).toBe('row');
    expect(Array.from(w.values.subarray(w.rowPtr[0], w.rowPtr[1]))).toEqual([0.2, 0.8]);
  });

  it('no header and no weight column: every link weighs 1', () => {
    const w = readEdgeList('North Vale,Hollow\nHollow,North Vale\n', places, { transform: 'as given' });
    expect(Array.from(w.values)).toEqual([1, 1]);
    expect(w.symmetricBase).not.toBeNull();
  });
});

describe('edge list round trip', () => {
  it('write then read gives the same matrix, values exact', () => {
    // Source: the CSV is parsed back with papaparse (a general-purpose CSV library) and with our reader.
    const w = buildWeights({ ids: ['a,1', 'b"2', 'c 3', 'd', 'e', 'f'], geometries: squareGrid(2, 3), coordinates: 'projected' }, { method: 'queen' });
    const text = writeEdgeList(w);
    const parsed = Papa.parse<string[]>(text.trim()).data;
    expect(parsed[0]).toEqual(['origin', 'neighbour', 'weight']);
    expect(parsed.length - 1).toBe(w.rowPtr[w.n]);
    expect(parsed[1]).toEqual(['a,1', 'b"2', String(w.values[0])]);
    const back = readEdgeList(text, w.ids, { transform: 'as given' });
    expect(Array.from(back.rowPtr)).toEqual(Array.from(w.rowPtr));
    expect(Array.from(back.colIdx)).toEqual(Array.from(w.colIdx));
    expect(Array.from(back.values)).toEqual(Array.from(w.values));
  });
});

describe('bad edge lists name the line', () => {
  const head = 'origin,neighbour,weight\n';
  it('unknown ID', () => {
    const m = message(() => readEdgeList(head + 'North Vale,Hollow,1\nNorth Vale,Lakeside,1\n', places, { source: 'links.csv' }));
    expect(m).toContain('links.csv, line 3');
    expect(m).toContain('Lakeside');
  });
  it('unknown origin', () => {
    expect(message(() => readEdgeList(head + 'Nowhere,Hollow,1\n', places))).toMatch(/line 2: the origin ID Nowhere/);
  });
  it('self-link', () => {
    expect(message(() => readEdgeList(head + 'Hollow,Hollow,1\n', places))).toMatch(/line 2: area Hollow is listed as its own neighbour/);
  });
  it('negative weight', () => {
    expect(message(() => readEdgeList(head + 'Hollow,North Vale,-1\n', places))).toMatch(/line 2: the weight "-1"/);
  });
  it('weight that is not a finite number', () => {
    expect(message(() => readEdgeList(head + 'Hollow,North Vale,1\nNorth Vale,Hollow,Infinity\n', places))).toMatch(/line 3: the weight "Infinity"/);
    expect(message(() => readEdgeList(head + 'Hollow,North Vale,NaN\n', places))).toMatch(/line 2/);
  });
  it('duplicate link names both lines', () => {
    expect(message(() => readEdgeList(head + 'Hollow,North Vale,1\n\nHollow,North Vale,2\n', places))).toMatch(/lines 2 and 4 both link Hollow to North Vale/);
  });
  it('a line with one ID only', () => {
    expect(message(() => readEdgeList(head + 'Hollow\n', places))).toMatch(/line 2: expected an origin ID and a neighbour ID/);
  });
  it('no links at all', () => {
    expect(message(() => readEdgeList(head, places, { source: 'empty.csv' }))).toMatch(/empty.csv has no links/);
  });
});

describe('a list written already row-standardised', () => {
  // The sidebar's Neighbours sheet and --neighbours files carry W = D⁻¹B itself. Read with rows
  // standardised, it must keep a symmetric form (the identity B = D·W) so that the exact algebra for
  // symmetric forms applies, and give the same weights as the binary list.
  it('is recognised as the row-standardised form of symmetric links (Columbus queen, numpy reference links)', async () => {
    const { readGolden } = await import('./helpers/columbus.js');
    const { symmetricForm } = await import('../src/weights/index.js');
    const nbs = readGolden().weights.neighbours as number[][];
    const ids = nbs.map((_, i) => `A${i}`);
    const binary = nbs.flatMap((nb, i) => nb.map((j) => `${ids[i]},${ids[j]},1`)).join('\n');
    const standardised = nbs.flatMap((nb, i) => nb.map((j) => `${ids[i]},${ids[j]},${1 / nb.length}`)).join('\n');
    const a = readEdgeList(binary, ids);
    const b = readEdgeList(standardised, ids);
    expect(b.symmetricBase).not.toBeNull();
    Array.from(a.values).forEach((v, p) => expect(b.values[p]).toBeCloseTo(v, 15));
    const sa = symmetricForm(a)!, sb = symmetricForm(b)!;
    Array.from(sa.values).forEach((v, p) => expect(sb.values[p]).toBeCloseTo(v, 12));
  });

  it('a list whose weights no symmetric links explain has none (one link weighed differently)', () => {
    const ids = ['A', 'B', 'C'];
    // the ratios w_ij / w_ji around the triangle A→B→C→A (1 · 5 · 0.9/0.5) do not multiply to 1
    const text = 'A,B,0.5\nA,C,0.5\nB,A,0.5\nB,C,0.5\nC,A,0.9\nC,B,0.1';
    expect(readEdgeList(text, ids).symmetricBase).toBeNull();
  });
});
