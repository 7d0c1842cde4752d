// The areas step says each join problem once: when the join fails, its error message (the engine's
// JoinError) names what stops it and the list adds only what the message leaves out. Invented unit
// squares with IDs written here, so each problem is known by construction.
import { describe, expect, it } from 'vitest';
import { JoinError, joinAreas, readBoundary, readTable } from '../src/geo/index.js';
import { joinProblemLines } from '../addin/shared/join-lines.js';
import { squareRing } from './fixtures/weights/shapes.js';

async function layerOf(ids: string[]) {
  const features = ids.map((id, i) => ({ type: 'Feature', properties: { zone: id }, geometry: { type: 'Polygon', coordinates: [squareRing(i, 0)] } }));
  return readBoundary([{ name: 'zones.geojson', bytes: new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features })) }]);
}
const csv = (s: string) => readTable({ name: 'values.csv', bytes: new TextEncoder().encode(s) });

describe('the join problems listed in the areas step', () => {
  it('a failed join (a repeated ID): the list keeps only the areas with no row, which the error leaves out', async () => {
    const layer = await layerOf(['a', 'b', 'c']);
    let error: JoinError | undefined;
    try { joinAreas(layer, await csv('zone,y\na,1\na,2\nb,3\n'), 'zone'); } catch (e) { error = e as JoinError; }
    expect(error).toBeInstanceOf(JoinError);
    expect(error!.message).toMatch(/IDs appear more than once: a \(rows 2, 3\)/);
    const lines = joinProblemLines(error!.report, true);
    expect(lines).toEqual(['Also, areas with no row (not a problem by itself): c (feature 3).']);
    expect(lines.join(' ')).not.toMatch(/\ba\b.*rows/);
  });

  it('a join that holds: areas with no row are listed as they are', async () => {
    const layer = await layerOf(['a', 'b', 'c']);
    const joined = joinAreas(layer, await csv('zone,y\na,1\nb,3\n'), 'zone');
    expect(joinProblemLines(joined.report, false)).toEqual(['Areas with no row: c (feature 3).']);
  });
});
