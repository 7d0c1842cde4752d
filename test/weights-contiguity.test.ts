// Contiguity. Sources, named beside each group: counting identities on square lattices, rook/queen
// moves (Manhattan/Chebyshev distance 1), hand-drawn special cases whose answer follows from the
// definitions, and the us-atlas 3.0.1 counties against topojson-client's shared arcs.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { feature, neighbors } from 'topojson-client';
import type { Topology, GeometryCollection } from 'topojson-specification';
import type { AreaGeometry } from '../src/geo/types.js';
import { InputError } from '../src/errors.js';
import { buildWeights, contiguityNeighbours, higherOrder, summarizeWeights } from '../src/weights/index.js';
import { assertWellFormed, polygon, row, squareGrid, squareRing } from './fixtures/weights/shapes.js';

const ids = (n: number) => Array.from({ length: n }, (_, i) => `A${i + 1}`);

describe('contiguity on square grids', () => {
  // Source: counting identity for an r × c lattice of squares — r(c−1) horizontal and c(r−1)
  // vertical shared sides, (r−1)(c−1) interior corners each joining two diagonal pairs; every
  // link counted in both directions.
  const rookLinks = (r: number, c: number) => 2 * (r * (c - 1) + c * (r - 1));
  const queenLinks = (r: number, c: number) => rookLinks(r, c) + 4 * (r - 1) * (c - 1);

  for (const [r, c] of [[1, 2], [2, 2], [3, 4], [7, 5], [20, 31]]) {
    it(`${r} × ${c}: rook and queen link counts`, () => {
      const rook = contiguityNeighbours(squareGrid(r, c), 'rook');
      const queen = contiguityNeighbours(squareGrid(r, c), 'queen');
      expect(rook.rowPtr[r * c]).toBe(rookLinks(r, c));
      expect(queen.rowPtr[r * c]).toBe(queenLinks(r, c));
      assertWellFormed(rook);
      assertWellFormed(queen);
    });

    it(`${r} × ${c} with extra vertices along shared sides: same counts`, () => {
      const rook = contiguityNeighbours(squareGrid(r, c, true), 'rook');
      const queen = contiguityNeighbours(squareGrid(r, c, true), 'queen');
      expect(rook.rowPtr[r * c]).toBe(rookLinks(r, c));
      expect(queen.rowPtr[r * c]).toBe(queenLinks(r, c));
    });
  }

  it('neighbour sets follow the lattice: rook = 4 sides, queen = 8 around (6 × 7)', () => {
    // Source: definition of rook / queen moves on a lattice (Chebyshev vs Manhattan distance 1).
    const r = 6, c = 7;
    const rook = contiguityNeighbours(squareGrid(r, c, true), 'rook');
    const queen = contiguityNeighbours(squareGrid(r, c, true), 'queen');
    for (let a = 0; a < r * c; a++) {
      const ai = Math.floor(a / c), aj = a % c;
      const wantRook: number[] = [], wantQueen: number[] = [];
      for (let b = 0; b < r * c; b++) {
        const di = Math.abs(Math.floor(b / c) - ai), dj = Math.abs((b % c) - aj);
        if (di + dj === 1) wantRook.push(b);
        if (b !== a && Math.max(di, dj) === 1) wantQueen.push(b);
      }
      expect(row(rook, a)).toEqual(wantRook);
      expect(row(queen, a)).toEqual(wantQueen);
    }
  });
});

describe('contiguity special cases', () => {
  it('a T-junction: one long side shared with two shorter squares, no common vertex in the middle', () => {
    // big square [0,2]², two unit squares above it; the big square has no vertex at (1, 2)
    const geoms = [polygon(squareRing(0, 0, 2)), polygon(squareRing(0, 2)), polygon(squareRing(1, 2))];
    const rook = contiguityNeighbours(geoms, 'rook');
    expect(row(rook, 0)).toEqual([1, 2]);
    expect(row(rook, 1)).toEqual([0, 2]);
  });

  it('touching at a corner only: queen yes, rook no', () => {
    const geoms = [polygon(squareRing(0, 0)), polygon(squareRing(1, 1))];
    expect(row(contiguityNeighbours(geoms, 'queen'), 0)).toEqual([1]);
    expect(row(contiguityNeighbours(geoms, 'rook'), 0)).toEqual([]);
  });

  it("a corner resting on the middle of another's side: queen yes, rook no", () => {
    // the diamond's lowest corner (1, 2) lies in the middle of the square's top side
    const diamond = polygon([[1, 2], [1.5, 2.5], [1, 3], [0.5, 2.5], [1, 2]]);
    const geoms = [polygon(squareRing(0, 0, 2)), diamond];
    expect(row(contiguityNeighbours(geoms, 'queen'), 0)).toEqual([1]);
    expect(row(contiguityNeighbours(geoms, 'rook'), 0)).toEqual([]);
  });

  it('a hole: the area filling it neighbours the area around it', () => {
    const ring = polygon(squareRing(0, 0, 3), [[1, 1], [1, 2], [2, 2], [2, 1], [1, 1]]);
    const geoms = [ring, polygon(squareRing(1, 1))];
    expect(row(contiguityNeighbours(geoms, 'rook'), 1)).toEqual([0]);
  });

  it('multi-part areas: any part counts', () => {
    const twoParts: AreaGeometry = { kind: 'polygon', polygons: [[squareRing(0, 0)], [squareRing(5, 0)]] };
    const geoms = [twoParts, polygon(squareRing(6, 0)), polygon(squareRing(2, 0))];
    expect(row(contiguityNeighbours(geoms, 'rook'), 0)).toEqual([1]);
    expect(row(contiguityNeighbours(geoms, 'rook'), 2)).toEqual([]);
  });

  it('on longitude/latitude, areas cut at the antimeridian meet across it (180 against −180); planar coordinates do not wrap', () => {
    // A ends at 180°, B starts at −180° along the same latitudes, C only touches A's corner across
    // the meridian, D lies on the meridian far to the south (the globe's geometry: ±180 is one line)
    const A = polygon(squareRing(170, 50, 10)), B = polygon(squareRing(-180, 50, 10));
    const C = polygon(squareRing(-180, 60, 10)), D = polygon(squareRing(-180, 10, 10));
    const geoms = [A, B, C, D];
    expect(row(contiguityNeighbours(geoms, 'rook', undefined, true), 0)).toEqual([1]);
    expect(row(contiguityNeighbours(geoms, 'queen', undefined, true), 0)).toEqual([1, 2]);
    expect(row(contiguityNeighbours(geoms, 'queen', undefined, true), 3)).toEqual([]);
    expect(row(contiguityNeighbours(geoms, 'queen'), 0)).toEqual([]);
    assertWellFormed(contiguityNeighbours(geoms, 'queen', undefined, true));
  });

  it('a tolerance bridges a thin gap that exact contiguity leaves open', () => {
    const geoms = [polygon(squareRing(0, 0)), polygon(squareRing(1.01, 0))];
    expect(contiguityNeighbours(geoms, 'rook').rowPtr[2]).toBe(0);
    expect(row(contiguityNeighbours(geoms, 'rook', 0.02), 0)).toEqual([1]);
    expect(row(contiguityNeighbours(geoms, 'queen', 0.02), 1)).toEqual([0]);
  });

  it('repeated points and unclosed rings do no harm', () => {
    const a = polygon([[0, 0], [1, 0], [1, 0], [1, 1], [0, 1]]);
    const b = polygon([[1, 0], [2, 0], [2, 1], [1, 1], [1, 1], [1, 0]]);
    expect(row(contiguityNeighbours([a, b], 'rook'), 0)).toEqual([1]);
  });
});

describe('higher-order contiguity', () => {
  // Source: on a full lattice the shortest rook path between cells is their Manhattan distance and
  // the shortest queen path their Chebyshev distance (graph-distance identities for grid graphs).
  const r = 6, c = 5;
  const dist = (a: number, b: number, queen: boolean) => {
    const di = Math.abs(Math.floor(a / c) - Math.floor(b / c)), dj = Math.abs((a % c) - (b % c));
    return queen ? Math.max(di, dj) : di + dj;
  };
  for (const rule of ['rook', 'queen'] as const) {
    for (const order of [2, 3]) {
      it(`${rule} order ${order}, exact and cumulative`, () => {
        const first = contiguityNeighbours(squareGrid(r, c), rule);
        const exact = higherOrder(first, order, false);
        const upTo = higherOrder(first, order, true);
        for (let a = 0; a < r * c; a++) {
          const all = Array.from({ length: r * c }, (_, b) => b);
          expect(row(exact, a)).toEqual(all.filter((b) => dist(a, b, rule === 'queen') === order));
          expect(row(upTo, a)).toEqual(all.filter((b) => b !== a && dist(a, b, rule === 'queen') <= order));
        }
      });
    }
  }

  it('through buildWeights, with a plain description', () => {
    const w = buildWeights({ ids: ids(30), geometries: squareGrid(6, 5), coordinates: 'projected' }, { method: 'rook', order: 2 });
    expect(w.description).toContain('exactly 2 steps');
    expect(w.rowPtr[30]).toBeGreaterThan(0);
  });
});

describe('rook contiguity of US counties against shared topology arcs', () => {
  // Source: us-atlas 3.0.1 counties-10m.json (US Census Bureau cartographic boundaries, TopoJSON),
  // with topojson-client's neighbors(): counties are neighbours when they use a common arc. A
  // shared arc is a stretch of common boundary of positive length, so it must equal rook
  // contiguity computed from the coordinates alone.
  // Observed difference, explained: topojson-client lists 16 counties as neighbours of themselves
  // (one arc used twice by the same county, e.g. parts of a county meeting along a line). Spatial
  // weights never link an area to itself, so these self-references are removed before comparing;
  // everything else agrees exactly.
  const topology = JSON.parse(readFileSync('node_modules/us-atlas/counties-10m.json', 'utf8')) as Topology;
  const counties = topology.objects.counties as GeometryCollection;
  const features = (feature(topology, counties) as unknown as { features: { geometry: { type: string; coordinates: number[][][] | number[][][][] } }[] }).features;
  const geometries: AreaGeometry[] = features.map((f) => ({
    kind: 'polygon',
    polygons: f.geometry.type === 'Polygon' ? [f.geometry.coordinates as number[][][]] : (f.geometry.coordinates as number[][][][]),
  }));
  const byArcs = neighbors(counties.geometries);

  it('same neighbour sets for all 3,231 counties; 16 topology self-references only', () => {
    // longitude/latitude, as the pipeline reads them: the antimeridian pass adds nothing the arcs lack
    const rook = contiguityNeighbours(geometries, 'rook', undefined, true);
    expect(rook.n).toBe(3231);
    assertWellFormed(rook);
    let selfReferences = 0;
    for (let i = 0; i < rook.n; i++) {
      const theirs = [...new Set(byArcs[i])].filter((j) => {
        if (j !== i) return true;
        selfReferences++;
        return false;
      });
      expect(row(rook, i)).toEqual(theirs.sort((a, b) => a - b));
    }
    expect(selfReferences).toBe(16);
  });

  it('queen adds only point contacts: a superset of rook', () => {
    const rook = contiguityNeighbours(geometries, 'rook', undefined, true);
    const queen = contiguityNeighbours(geometries, 'queen', undefined, true);
    for (let i = 0; i < rook.n; i++) {
      const q = new Set(row(queen, i));
      for (const j of row(rook, i)) expect(q.has(j)).toBe(true);
    }
    // Four Corners (recalled from memory): Apache AZ 04001, San Juan NM 35045, Montezuma CO 08083
    // and San Juan UT 49037 meet at one point, so the diagonal pairs are queen but not rook.
    const id = (fips: string) => counties.geometries.findIndex((g) => g.id === fips);
    const apache = id('04001'), montezuma = id('08083');
    expect(row(queen, apache)).toContain(montezuma);
    expect(row(rook, apache)).not.toContain(montezuma);
  });
});

describe('withoutNeighbours', () => {
  const geoms = [...squareGrid(2, 2), polygon(squareRing(10, 0))];
  const input = { ids: ['n1', 'n2', 'n3', 'n4', 'far'], geometries: geoms, coordinates: 'projected' as const };

  it('are listed by ID, keep zero rows, and count as components of their own', () => {
    const w = buildWeights(input, { method: 'rook' });
    const s = summarizeWeights(w);
    expect(s.withoutNeighbours).toEqual(['far']);
    expect(s.components).toBe(2);
    expect(w.rowPtr[5] - w.rowPtr[4]).toBe(0);
  });

  it('can be linked to their nearest area both ways, and the description says so', () => {
    const points = { x: new Float64Array([0.5, 1.5, 0.5, 1.5, 10.5]), y: new Float64Array([0.5, 0.5, 1.5, 1.5, 0.5]) };
    const w = buildWeights({ ...input, points }, { method: 'rook' }, { linkUnneighboured: true });
    expect(row(w, 4)).toEqual([1]);
    expect(row(w, 1)).toContain(4);
    expect(w.linkedUnneighboured).toEqual(['far']);
    expect(w.description).toContain('far');
    expect(summarizeWeights(w).components).toBe(1);
    expect(summarizeWeights(w).symmetric).toBe(false); // row-standardised; the base stays symmetric
    expect(w.symmetricBase).not.toBeNull();
  });

  it('points only: an error that suggests a distance band of a useful size', () => {
    const pts: AreaGeometry[] = [0, 3, 7].map((x) => ({ kind: 'point', point: [x, 0] }));
    const call = () => buildWeights({ ids: ['p', 'q', 'r'], geometries: pts, coordinates: 'projected' }, { method: 'queen' });
    expect(call).toThrow(InputError);
    expect(call).toThrow(/Queen contiguity needs areas with boundaries, but every area is a point/);
    expect(call).toThrow(/a distance band \(--weights band:4, the distance in coordinate units at which every area has a neighbour\)/);
  });

  it('a bad tolerance is refused', () => {
    expect(() => contiguityNeighbours(squareGrid(2, 2), 'rook', -1)).toThrow(/tolerance/);
  });
});
