import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell, NumberFormat } from './types.js';
import { MODEL_LABEL, num, say, yesNo } from './format.js';
import { describeRule } from '../weights/index.js';
import { SMOOTHING_LABEL } from './rates.js';

/** What went in and how it was run, so the result can be reproduced and checked. */
export function recordBlocks(result: AnalysisResult): Block[] {
  const r = result.request;
  const kv = (label: string, value: Cell, format: NumberFormat = 'text'): [string, Cell, NumberFormat] => [label, value, format];
  const blocks: Block[] = [
    { kind: 'title', text: 'How these results were made' },
    {
      kind: 'table', title: 'Input files',
      columns: [
        { header: 'Role', format: 'text', width: 12 },
        { header: 'File', format: 'text', width: 30 },
        { header: 'Size in bytes', format: 'integer', width: 14 },
        { header: 'SHA-256 fingerprint', format: 'text', width: 68 },
      ],
      rows: result.inputs.map((f): Cell[] => [f.role, f.name, f.bytes, f.sha256]),
      note: 'The fingerprint changes if a single byte of the file changes; compare it to check that a file is the one used here.',
    },
    {
      kind: 'keyValues', title: 'Settings',
      rows: [
        kv('Sheet read', r.sheet ?? '(first sheet, or not a workbook)'),
        kv('ID column', r.id),
        ...(r.boundaryId ? [kv('ID property in the boundary file', r.boundaryId)] : []),
        kv('IDs matched ignoring leading zeros', r.idsIgnoreLeadingZeros ? 'yes, as asked (e.g. 01001 matched 1001)' : 'no'),
        ...(r.label ? [kv('Label column', r.label)] : []),
        kv('Outcome column', r.y),
        kv('Explanatory columns', r.x.join(', ')),
        kv('Neighbour definition asked for', describeRule(r.weights)),
        kv('Neighbour definition used', result.weights.description),
        ...(result.comparison ? [kv('Also fitted, for comparison, under', result.comparison.filter((c) => !c.asRun).map((c) => c.label).join('; '))] : []),
        ...(r.rates ? r.rates.recipes.map((q) => kv(`Rate ${q.name}`, `${q.events} / ${q.population} per ${q.per}; modelled as the ${r.rates!.smoothing} smoothed rate (${SMOOTHING_LABEL[r.rates!.smoothing]}) where the model uses it`)) : []),
        ...(result.rates?.length ? [
          kv('Rule for flagging rates', result.rates[0].flagRule),
          kv('Flagged areas withheld in this workbook', r.rates?.withholdFlagged ? 'yes: their events and rates are blank, and the outcome and residuals too when the outcome is the rate' : 'no'),
        ] : []),
        kv('Weights transform', r.transform),
        kv('Models fitted', r.models.map((m) => MODEL_LABEL[m]).join(', ')),
        kv('Robust standard errors asked for', yesNo(r.robust)),
        kv('Rows with missing values left out', yesNo(r.dropMissing)),
        kv('Random seed', r.seed, 'integer'),
        kv('Simulated draws for spillover effects', r.impactDraws, 'integer'),
        kv('Random permutations for Moran\'s I', r.permutations, 'integer'),
        kv('Log-determinant method', result.algebra.logDeterminant),
        kv('Log-determinant accuracy', result.algebra.accuracy),
        kv('Trace computation', result.algebra.traces),
        kv('Lowest admissible spatial parameter', num(result.algebra.range.lower), 'decimal4'),
        kv('Highest admissible spatial parameter', num(result.algebra.range.upper), 'decimal4'),
        kv('How the range was found', `${result.algebra.range.method} (${say(result.algebra.range.lower)} to ${say(result.algebra.range.upper)})`),
        kv('Coordinates', `${result.coordinates}: ${result.coordinateEvidence}`),
        kv('Engine version', result.engineVersion),
        kv('Made at', result.createdAt),
      ],
    },
    {
      kind: 'keyValues', title: 'Matching the table to the boundaries',
      rows: [
        kv('Table rows without a matching area', result.join.unmatchedRows.length, 'integer'),
        kv('Areas without a matching table row', result.join.unmatchedFeatures.length, 'integer'),
        kv('IDs repeated in the table', result.join.duplicateRows.length, 'integer'),
        kv('IDs repeated in the boundaries', result.join.duplicateFeatures.length, 'integer'),
        kv('Matched areas without a shape', result.join.withoutGeometry.length, 'integer'),
        kv('IDs that differ only by leading zeros', result.join.zeroPaddingSuspects.length, 'integer'),
        ...(r.idsIgnoreLeadingZeros ? [kv('IDs matched although their leading zeros differ', result.join.matchedIgnoringZeros?.length ?? 0, 'integer')] : []),
      ],
    },
  ];
  if (result.droppedRows.length) {
    blocks.push({
      kind: 'table', title: 'Rows left out for missing values',
      columns: [{ header: 'Table row', format: 'integer', width: 10 }, { header: 'Area ID', format: 'text', width: 14 }, { header: 'Missing in', format: 'text', width: 40 }],
      rows: result.droppedRows.map((d): Cell[] => [d.row, d.id, d.columns.join(', ')]),
    });
  }
  const withheld = (result.rates ?? []).flatMap((q) => (q.withholdFlagged ? q.areas.map((a, i) => ({ a, i, q })).filter((x) => x.a.flagged) : []));
  if (withheld.length) {
    blocks.push({
      kind: 'table', title: 'Areas withheld for privacy (their rates rest on few events)',
      columns: [{ header: 'Rate', format: 'text', width: 16 }, { header: 'Area ID', format: 'text', width: 14 }, { header: 'Table row', format: 'integer', width: 10 }],
      rows: withheld.map(({ a, i, q }): Cell[] => [q.name, a.id, result.rows[i]]),
      note: 'Their events and every rate are blank on the "Rates" sheet; the figures were computed from all areas.',
    });
  }
  const timings = Object.entries(result.timings);
  if (timings.length) {
    blocks.push({
      kind: 'table', title: 'Time taken',
      columns: [{ header: 'Stage', format: 'text', width: 34 }, { header: 'Time', format: 'text', width: 22 }],
      rows: timings.map(([k, v]): Cell[] => [stageLabel(k), sayDuration(v)]),
    });
  }
  return blocks;
}

/** The pipeline's stage keys (run-analysis.ts, fit-under-weights.ts) in words; a model's key takes its label. */
const STAGE_WORDS: Record<string, string> = {
  read: 'Reading the files',
  join: 'Joining the table to the boundaries',
  weights: 'Finding the neighbours',
  ols: 'Plain regression and Moran\'s I of the outcome',
  algebra: 'Algebra of the neighbour weights',
  tests: 'Tests on the residuals',
  comparison: 'Other neighbour definitions',
  local: 'Local statistics',
};

function stageLabel(key: string): string {
  if (STAGE_WORDS[key]) return STAGE_WORDS[key];
  const [model, rest] = key.split(' ');
  const label = (MODEL_LABEL as Record<string, string>)[model];
  if (!label) return key;
  return rest === 'impacts' ? `${label}: spillover effects` : label;
}

/** A duration in words: "under a millisecond", "38 milliseconds", "1.2 seconds", "2 minutes 5 seconds". */
export function sayDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return 'not measured';
  if (seconds < 0.001) return 'under a millisecond';
  if (seconds < 1) {
    const ms = Math.round(seconds * 1000);
    return ms === 1 ? '1 millisecond' : `${ms} milliseconds`;
  }
  if (seconds < 60) {
    const s = seconds < 10 ? +seconds.toFixed(1) : Math.round(seconds);
    return s === 1 ? '1 second' : `${s} seconds`;
  }
  const whole = Math.round(seconds);
  const m = Math.floor(whole / 60);
  const rest = whole % 60;
  return `${m} minute${m === 1 ? '' : 's'}${rest ? ` ${rest} second${rest === 1 ? '' : 's'}` : ''}`;
}
