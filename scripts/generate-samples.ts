/**
 * Writes the demo's invented sample data: the Vell Basin, a made-up river region.
 *
 *   node --import tsx scripts/generate-samples.ts [folder]     (default: sample-workbooks/)
 *
 * Districts: a Voronoi tessellation (d3-delaunay) of jittered hex-grid sites, each cell clipped to
 * a convex invented outline, in projected metres on an invented local grid. Outcome simulated from
 * a spatial lag process on row-standardised queen contiguity. Villages: points with an outcome from
 * a spatial error process on row-standardised 5-nearest-neighbour weights. Everything follows from
 * the two seeds (DISTRICT_SEED, VILLAGE_SEED), so a rerun gives the same files.
 *
 * The pieces live in scripts/samples/: geometry, seeded draws, the basin, neighbours, districts,
 * villages and the written files. Written by hand there: the seeded generator (mulberry32),
 * Box–Muller, the convex clipper (Sutherland–Hodgman) and the fixed-point solve — each is a few
 * lines and no kept library has them.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { DISTRICT_COLUMNS, makeDistricts } from './samples/districts.js';
import { buildAboutRows, geojsonText, workbookBytes } from './samples/files.js';
import type { Pt } from './samples/geometry.js';
import { VILLAGE_COLUMNS, makeVillages } from './samples/villages.js';

export async function generateSamples(folder: string): Promise<string[]> {
  mkdirSync(folder, { recursive: true });
  const d = await makeDistricts();
  const v = makeVillages(d.outline);
  const closed = (ring: Pt[]): Pt[] => [...ring, ring[0]];
  const written: Record<string, string | Uint8Array> = {
    'vell-basin-districts.geojson': geojsonText(
      d.cells.map((ring, i) => ({
        properties: { district_id: String(d.rows[i].district_id), district_name: String(d.rows[i].district_name) },
        geometry: { type: 'Polygon', coordinates: [closed(ring)] },
      })),
    ),
    'vell-basin-villages.geojson': geojsonText(
      v.points.map((p, i) => ({
        properties: { village_id: String(v.rows[i].village_id), village_name: String(v.rows[i].village_name) },
        geometry: { type: 'Point', coordinates: p },
      })),
    ),
    'vell-basin-truth.json': `${JSON.stringify(d.truth, null, 2)}\n`,
    'vell-basin-villages-truth.json': `${JSON.stringify(v.truth, null, 2)}\n`,
    'vell-basin.xlsx': await workbookBytes('Districts', DISTRICT_COLUMNS, d.rows, buildAboutRows('districts', d.truth, DISTRICT_COLUMNS)),
    'vell-basin-villages.xlsx': await workbookBytes('Villages', VILLAGE_COLUMNS, v.rows, buildAboutRows('villages', v.truth, VILLAGE_COLUMNS)),
  };
  for (const [name, body] of Object.entries(written)) writeFileSync(join(folder, name), body);
  return Object.keys(written);
}

const thisFile = fileURLToPath(import.meta.url);
if (process.argv[1] && pathToFileURL(resolve(process.argv[1])).href === pathToFileURL(thisFile).href) {
  const folder = resolve(process.argv[2] ?? join(dirname(thisFile), '..', 'sample-workbooks'));
  generateSamples(folder).then(
    (files) => console.log(`wrote ${files.length} files to ${folder}:\n  ${files.join('\n  ')}`),
    (err: unknown) => {
      console.error(err);
      process.exitCode = 1;
    },
  );
}
