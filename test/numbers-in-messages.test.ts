// Counts in messages, warnings and notes read the same everywhere: grouped by threes with a comma
// ("22,500 areas"), through one formatter (src/core/count.ts). The reference for the grouping is the
// ECMAScript Internationalization API's en-US number format (Intl.NumberFormat), a general-purpose
// library outside the project.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { formatCount } from '../src/core/count.js';
import { runAnalysis } from '../src/pipeline/index.js';
import { gridGeoJson } from '../bench/grid-geojson.js';

const ROOT = join(import.meta.dirname, '..');

describe('one formatter for counts', () => {
  it('groups whole numbers by threes as the en-US number format does, and leaves other numbers as they are', () => {
    const reference = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0 });
    fc.assert(fc.property(fc.integer({ min: -Number.MAX_SAFE_INTEGER, max: Number.MAX_SAFE_INTEGER }), (n) => {
      expect(formatCount(n)).toBe(reference.format(n).replace('\u2212', '-'));
    }));
    expect(formatCount(22500)).toBe('22,500');
    expect(formatCount(999)).toBe('999');
    expect(formatCount(1_048_576)).toBe('1,048,576');
    expect(formatCount(0.5)).toBe('0.5');
    expect(formatCount(Number.NaN)).toBe('NaN');
  });

  it('the note on the permutation test names the areas grouped (10,100 areas: a 101 × 100 grid, over the 10,000 where it is left out)', async () => {
    const bytes = new TextEncoder().encode(gridGeoJson(101, 100));
    const r = await runAnalysis({ boundary: [{ name: 'grid.geojson', bytes }], id: 'id', y: 'y', x: ['x1'], weights: { method: 'rook' }, transform: 'row', models: ['ols'] });
    expect(r.warnings).toContain("With 10,100 areas the permutation test of Moran's I was not run by default (the randomisation p-value is reliable at this size); ask for it with a number of permutations.");
  }, 60_000);

  it('no message in the engine or the add-in puts a count before "areas", "rows", "features" and the like without the formatter', () => {
    const files = (dir: string): string[] => readdirSync(dir).flatMap((name) => {
      const p = join(dir, name);
      return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
    });
    // a bare ${…} just before a counted word; words that only name things (a file stem, a unit) are not counts
    const bare = /\$\{([^}{$`]+)\}(?= (?:areas?|rows?|features?|links|permutations|draws|points|cells|area\(s\)|row\(s\)|feature\(s\)|ID\(s\)|values|squares|pairs|vertices|columns|parts|record\(s\)|ring\(s\))\b)/g;
    const namesNotCounts = new Set(['stem', 'override', 'unit']);
    const found: string[] = [];
    // src/linalg's own messages are left to that stage (it imports nothing of the others)
    for (const file of [...files(join(ROOT, 'src')).filter((f) => !f.includes('/src/linalg/')), ...files(join(ROOT, 'addin'))]) {
      for (const m of readFileSync(file, 'utf8').matchAll(bare)) {
        const expr = m[1].trim();
        if (!namesNotCounts.has(expr) && !/^(formatCount|count|n)\(/.test(expr)) found.push(`${relative(ROOT, file)}: \${${m[1]}}`);
      }
    }
    expect(found).toEqual([]);
  });
});
