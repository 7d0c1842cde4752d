/**
 * A results report for many areas, for checks of how the add-in writes large results: the invented
 * tracts of "Tarn Vale" on a side × side grid, each linked to six neighbours (the four sharing an edge
 * and the two diagonal ones running north-east to south-west, a hexagonal pattern), row-standardised.
 * The "By area" and "Neighbours" sheets come from the report's own builders; the values are invented
 * (a smooth surface plus a deterministic wobble), as is the Summary sheet carrying the Moran scatter.
 */
import type { AnalysisResult } from '../../src/pipeline/types.js';
import { areasBlocks } from '../../src/report/areas.js';
import { neighboursBlocks } from '../../src/report/neighbours.js';
import type { Report } from '../../src/report/index.js';
import { summarizeWeights, type SpatialWeights } from '../../src/weights/index.js';
import type { ScatterPoints } from '../../addin/shared/types.js';

// The 8-byte PNG signature (PNG spec, section 5.2) stands in for a rendered picture.
const PNG_STUB = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

export function largeReport(side: number): { report: Report; scatter: ScatterPoints; ids: string[]; links: number } {
  const n = side * side;
  const ids = Array.from({ length: n }, (_, i) => `TV${String(i + 1).padStart(6, '0')}`);
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  for (let r = 0; r < side; r++) for (let c = 0; c < side; c++) {
    const nb: number[] = [];
    for (const [dr, dc] of [[-1, 0], [-1, 1], [0, -1], [0, 1], [1, -1], [1, 0]]) {
      const rr = r + dr, cc = c + dc;
      if (rr >= 0 && rr < side && cc >= 0 && cc < side) nb.push(rr * side + cc);
    }
    nb.sort((a, b) => a - b);
    cols.push(...nb);
    rowPtr[r * side + c + 1] = cols.length;
  }
  const colIdx = Int32Array.from(cols);
  const values = new Float64Array(colIdx.length);
  const from = new Int32Array(colIdx.length);
  for (let i = 0; i < n; i++) {
    const k = rowPtr[i + 1] - rowPtr[i];
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) { values[p] = 1 / k; from[p] = i; }
  }
  const w: SpatialWeights = {
    n, rowPtr, colIdx, values, ids, description: 'six neighbours on a hexagonal pattern (invented)',
    spec: { method: 'edge-list', source: 'invented' }, transform: 'row', symmetricBase: null,
  };
  const summary = summarizeWeights(w);
  const y = new Float64Array(n), fitted = new Float64Array(n), residuals = new Float64Array(n), lag = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = Math.floor(i / side), c = i % side;
    y[i] = 40 + 10 * Math.sin(r / 17) + 8 * Math.cos(c / 23) + ((i * 7919) % 101) / 50;
    fitted[i] = 40 + 10 * Math.sin(r / 17) + 8 * Math.cos(c / 23);
    residuals[i] = y[i] - fitted[i];
  }
  for (let i = 0; i < n; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) lag[i] += values[p] * residuals[colIdx[p]];
  const result = {
    request: { y: 'clinic_visits' }, ids, rows: ids.map((_, i) => i + 2), y,
    ols: { fitted, residuals }, fits: { ols: { fitted, residuals, residualLag: lag } },
    weights: { description: w.description, transform: 'row', summary, edges: { from, to: colIdx, weight: values } },
  } as unknown as AnalysisResult;
  const z = Array.from(residuals, (v) => v / 0.6);
  const report: Report = {
    sheets: [
      {
        name: 'Summary', role: 'overview',
        blocks: [{ kind: 'title', text: 'Clinic visits in Tarn Vale (invented)' }, { kind: 'paragraph', text: 'Invented figures for a check of large results.' }],
        images: [{ name: 'Moran scatter plot', png: PNG_STUB, svg: '<svg/>', widthPx: 400, heightPx: 300, anchor: { row: 4, col: 1 }, alt: 'Moran scatter plot' }],
      },
      { name: 'By area', role: 'areas', blocks: areasBlocks(result), freezeHeader: true },
      { name: 'Neighbours', role: 'neighbours', blocks: neighboursBlocks(result) },
    ],
  };
  const scatter: ScatterPoints = { valueName: 'clinic_visits', z, lag: Array.from(lag, (v) => v / 0.6), slope: 0 };
  return { report, scatter, ids, links: colIdx.length };
}
