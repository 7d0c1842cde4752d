/**
 * Rook and queen contiguity for the US counties of us-atlas (counties-10m.json), built here with
 * topojson-client so the benchmark does not depend on the weights stage: rook = shared arcs
 * (topojson-client `neighbors`), queen = shared arc vertices. Coordinates: mean of ring vertices.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { feature, neighbors } from 'topojson-client';
import type { Topology, GeometryCollection } from 'topojson-specification';
import { weightsFromNeighbours } from './grid.js';

export function countyWeights(kind: 'rook' | 'queen') {
  const require = createRequire(import.meta.url);
  const path = require.resolve('us-atlas/counties-10m.json');
  const topo = JSON.parse(readFileSync(path, 'utf8')) as Topology;
  const counties = topo.objects.counties as GeometryCollection;
  const geoms = counties.geometries;
  const n = geoms.length;
  let nb: number[][];
  if (kind === 'rook') {
    nb = neighbors(geoms as never) as number[][];
  } else {
    // absolute quantized vertices of every arc
    const arcPoints = topo.arcs.map((arc) => {
      let x = 0, y = 0;
      return arc.map(([dx, dy]) => { x += dx; y += dy; return x * 1e6 + y; });
    });
    const owners = new Map<number, number[]>();
    geoms.forEach((g, i) => {
      const arcs = (g as { arcs?: unknown }).arcs;
      const flat = (arcs ? (JSON.parse(JSON.stringify(arcs)) as unknown[]).flat(3) : []) as number[];
      const seen = new Set<number>();
      for (const a of flat) for (const key of arcPoints[a < 0 ? ~a : a]) seen.add(key);
      for (const key of seen) {
        const list = owners.get(key);
        if (list) list.push(i); else owners.set(key, [i]);
      }
    });
    const sets = Array.from({ length: n }, () => new Set<number>());
    for (const list of owners.values()) {
      if (list.length < 2) continue;
      for (const a of list) for (const b of list) if (a !== b) sets[a].add(b);
    }
    nb = sets.map((s) => [...s]);
  }
  const x = new Float64Array(n), y = new Float64Array(n);
  const fc = feature(topo, counties) as unknown as { features: { geometry: { type: string; coordinates: number[][][] | number[][][][] } | null }[] };
  fc.features.forEach((f, i) => {
    if (!f.geometry) return;
    const rings = f.geometry.type === 'Polygon' ? [(f.geometry.coordinates as number[][][])[0]] : (f.geometry.coordinates as number[][][][]).map((p) => p[0]);
    let sx = 0, sy = 0, c = 0;
    for (const ring of rings) for (const [px, py] of ring) { sx += px; sy += py; c++; }
    x[i] = c ? sx / c : 0;
    y[i] = c ? sy / c : 0;
  });
  return { ...weightsFromNeighbours(nb), x, y };
}
