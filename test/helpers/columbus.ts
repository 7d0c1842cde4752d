import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import * as shapefile from 'shapefile';
import type { Design } from '../../src/models/types.js';

const here = (p: string): string => fileURLToPath(new URL(p, import.meta.url));
export const GOLDEN_PATH = here('../golden/columbus.json');
const DBF_PATH = here('../fixtures/columbus/columbus.dbf');

/** Golden figures from scripts/reference/columbus.py (numpy/scipy); a missing file fails the checks, never skips them. */
export function readGolden(): any {
  if (!existsSync(GOLDEN_PATH)) throw new Error(`Columbus golden figures not found at ${GOLDEN_PATH}; run scripts/reference/columbus.py.`);
  return JSON.parse(readFileSync(GOLDEN_PATH, 'utf8'));
}

/** CRIME and the design [constant, INC, HOVAL] from the Columbus .dbf, in row order (shapefile library). */
export async function columbusData(): Promise<{ y: Float64Array; x: Design }> {
  const source = await shapefile.openDbf(DBF_PATH);
  const rows: Record<string, number>[] = [];
  for (;;) {
    const r = await source.read();
    if (r.done) break;
    rows.push(r.value as Record<string, number>);
  }
  const col = (name: string) => Float64Array.from(rows, (r) => Number(r[name]));
  return {
    y: col('CRIME'),
    x: { intercept: 0, names: ['constant', 'INC', 'HOVAL'], columns: [new Float64Array(rows.length).fill(1), col('INC'), col('HOVAL')] },
  };
}
