/** Joins table rows to boundary features by an ID column; the table's row order is kept. */
import { InputError, listSome } from '../errors.js';
import type { AreaGeometry, AreaLayer, DataTable, JoinReport, JoinedAreas } from './types.js';
import type { Cell } from './table-shape.js';
import { idText, toCell, unpadded } from './ids.js';
import { caseMessage, caseOnlyPairs, refuseIdsNotText } from './id-checks.js';
import { formulaNote } from './formula-note.js';

/** An InputError that also carries the full join report, for screens that list every problem. */
export class JoinError extends InputError {
  readonly report: JoinReport;
  constructor(message: string, report: JoinReport, file?: string) {
    super(message, file ? { file } : {});
    this.name = 'InputError';
    this.report = report;
  }
}

/** A join report with nothing in it (also for screens that show one before a join could run). */
export function emptyJoinReport(): JoinReport {
  return {
    unmatchedRows: [], unmatchedFeatures: [], duplicateRows: [], duplicateFeatures: [],
    blankRows: [], blankFeatures: [], withoutGeometry: [], zeroPaddingSuspects: [],
  };
}

export function joinAreas(
  layer: AreaLayer,
  table: DataTable | null,
  idColumn: string,
  opts: { featureIdProperty?: string } = {},
): JoinedAreas {
  const featureProp = opts.featureIdProperty ?? idColumn;
  if (!layer.propertyNames.includes(featureProp)) {
    let elsewhere = '';
    if (table && !opts.featureIdProperty) {
      const best = idPropertyCandidates(layer, table, idColumn)[0];
      elsewhere = best
        ? ` Its property "${best.property}" holds ${best.matches} of the ${best.rows} IDs in ${table.sourceName}'s "${idColumn}": name it as the boundary file's ID to join by it.`
        : ` If it holds the same IDs under another name, name that property as the boundary file's ID.`;
    }
    throw new InputError(
      `${layer.sourceName} has no property "${featureProp}" to join by; its properties are ${listSome(layer.propertyNames.map((n) => `"${n}"`), 30)}.${elsewhere}`,
      { file: layer.sourceName, column: featureProp },
    );
  }
  const report = emptyJoinReport();
  const areas = layer.areas;
  const featureIds = areas.map((a) => idText(a.properties[featureProp]));
  const byFeatureId = new Map<string, number[]>();
  featureIds.forEach((id, i) => {
    if (id === null) report.blankFeatures.push(areas[i].feature);
    else byFeatureId.set(id, [...(byFeatureId.get(id) ?? []), i]);
  });
  for (const [id, list] of byFeatureId) {
    if (list.length > 1) report.duplicateFeatures.push({ id, features: list.map((i) => areas[i].feature) });
  }

  let ids: string[];
  let rows: number[];
  let featureIndex: number[];
  let tableIndex: number[] | null = null;
  /** the IDs the table asks for (null without a table: then every feature is a row) */
  let tableIds: Map<string, number[]> | null = null;
  let rowWord = 'feature';
  if (table) {
    const col = table.columns.indexOf(idColumn);
    if (col < 0) {
      throw new InputError(
        `${table.sourceName} has no column "${idColumn}" to join by; its columns are ${listSome(table.columns.map((n) => `"${n}"`), 30)}.`,
        { file: table.sourceName, column: idColumn },
      );
    }
    rowWord = table.rowsAreFeatures ? 'feature' : 'row';
    if (table.rows.length === 0) {
      throw new InputError(
        `${table.sourceName} has a header (row ${table.firstRow - 1}) but no data rows under it; add one row per area.`,
        { file: table.sourceName, row: table.firstRow },
      );
    }
    const rowNo = (i: number) => table.rowNumbers?.[i] ?? table.firstRow + i;
    refuseIdsNotText(
      table.rows.flatMap((r, i) => { const id = idText(r[col]); return id === null ? [] : [{ id, where: `${rowWord} ${rowNo(i)}` }]; }),
      table.sourceName, idColumn,
    );
    const byRowId = new Map<string, number[]>();
    tableIds = byRowId;
    table.rows.forEach((r, i) => {
      const id = idText(r[col]);
      if (id === null) report.blankRows.push(rowNo(i));
      else byRowId.set(id, [...(byRowId.get(id) ?? []), i]);
    });
    ids = [];
    rows = [];
    featureIndex = [];
    tableIndex = [];
    const matched = new Set<number>();
    for (const [id, list] of byRowId) {
      if (list.length > 1) report.duplicateRows.push({ id, rows: list.map(rowNo) });
    }
    table.rows.forEach((r, i) => {
      const id = idText(r[col]);
      if (id === null) return;
      const hit = byFeatureId.get(id);
      if (!hit) {
        report.unmatchedRows.push({ row: rowNo(i), id });
        return;
      }
      const f = hit[0];
      matched.add(f);
      ids.push(id);
      rows.push(rowNo(i));
      featureIndex.push(f);
      tableIndex!.push(i);
    });
    featureIds.forEach((id, f) => {
      if (id !== null && !matched.has(f)) report.unmatchedFeatures.push({ feature: areas[f].feature, id });
    });
    report.zeroPaddingSuspects = paddingSuspects(report.unmatchedRows.map((u) => u.id), report.unmatchedFeatures.map((u) => u.id));
  } else {
    refuseIdsNotText(featureIds.flatMap((id, f) => (id === null ? [] : [{ id, where: `feature ${areas[f].feature}` }])), layer.sourceName, featureProp);
    ids = [];
    rows = [];
    featureIndex = [];
    featureIds.forEach((id, f) => {
      if (id === null) return;
      ids.push(id);
      rows.push(areas[f].feature);
      featureIndex.push(f);
    });
  }
  featureIndex.forEach((f, k) => {
    if (areas[f].geometry === null) report.withoutGeometry.push({ id: ids[k], row: rows[k], feature: areas[f].feature });
  });

  const formulaRows = table?.formulasWithoutResult?.get(idColumn)?.filter((r) => report.blankRows.includes(r)) ?? [];
  const blankNote = formulaRows.length ? ` ${formulaNote(formulaRows)}` : '';
  const problems = fatalProblems(report, layer.sourceName, table?.sourceName ?? null, rowWord, tableIds, blankNote);
  if (problems.length > 0) {
    throw new JoinError(`Joining by "${idColumn}" failed:\n- ${problems.join('\n- ')}`, report, table?.sourceName ?? layer.sourceName);
  }

  const warnings: string[] = [];
  if (report.unmatchedFeatures.length > 0) {
    warnings.push(
      `${report.unmatchedFeatures.length} feature(s) of ${layer.sourceName} have no row in ${table!.sourceName} and are left out ` +
        `(they will not count as anyone's neighbour): ${listSome(report.unmatchedFeatures.map((u) => `feature ${u.feature} (${u.id})`))}.`,
    );
  }
  if (report.zeroPaddingSuspects.length > 0) warnings.push(paddingMessage(report));
  if (table && report.blankFeatures.length > 0) {
    warnings.push(`${report.blankFeatures.length} feature(s) of ${layer.sourceName} have a blank ID and are left out: features ${listSome(report.blankFeatures)}.`);
  }

  const columnNames = table ? [...table.columns] : [];
  for (const n of layer.propertyNames) if (!columnNames.includes(n)) columnNames.push(n);
  const source = table?.sourceName ?? layer.sourceName;
  const column = (name: string): Cell[] => {
    const k = table ? table.columns.indexOf(name) : -1;
    if (k >= 0) return tableIndex!.map((i) => table!.rows[i][k] ?? null);
    if (layer.propertyNames.includes(name)) return featureIndex.map((f) => toCell(areas[f].properties[name]));
    throw new InputError(
      `There is no column "${name}" in ${source}; the columns are ${listSome(columnNames.map((n) => `"${n}"`), 30)}.`,
      { file: source, column: name },
    );
  };
  return {
    ids,
    geometries: featureIndex.map((f) => areas[f].geometry as AreaGeometry),
    rows,
    column,
    columnNames,
    coordinates: layer.coordinates,
    coordinateEvidence: layer.coordinateEvidence,
    ...(layer.coordinatesGuessed ? { coordinatesGuessed: true } : {}),
    report,
    warnings: [...layer.warnings, ...(table?.warnings ?? []), ...warnings],
    rowKind: rowWord === 'feature' ? 'feature' : 'row',
    ...(table?.decimalComma ? { decimalComma: true } : {}),
    ...(table?.dotDecimals ? { dotDecimals: true } : {}),
    ...(table?.formulasWithoutResult ? { formulasWithoutResult: table.formulasWithoutResult } : {}),
  };
}

/**
 * Properties of the boundary file that could hold the table's IDs: for each, how many of the
 * table's distinct IDs in `idColumn` it holds, best first (only those holding at least one).
 */
export function idPropertyCandidates(layer: AreaLayer, table: DataTable, idColumn: string): { property: string; matches: number; rows: number }[] {
  const col = table.columns.indexOf(idColumn);
  if (col < 0) return [];
  const wanted = new Set<string>();
  for (const r of table.rows) { const id = idText(r[col]); if (id !== null) wanted.add(id); }
  const out: { property: string; matches: number; rows: number }[] = [];
  for (const property of layer.propertyNames) {
    const held = new Set<string>();
    for (const a of layer.areas) { const id = idText(a.properties[property]); if (id !== null && wanted.has(id)) held.add(id); }
    if (held.size > 0) out.push({ property, matches: held.size, rows: wanted.size });
  }
  return out.sort((a, b) => b.matches - a.matches);
}

function paddingSuspects(rowIds: string[], featureIds: string[]): JoinReport['zeroPaddingSuspects'] {
  const byUnpadded = new Map<string, string[]>();
  for (const id of featureIds) {
    const u = unpadded(id);
    if (u !== null) byUnpadded.set(u, [...(byUnpadded.get(u) ?? []), id]);
  }
  const out: JoinReport['zeroPaddingSuspects'] = [];
  for (const id of rowIds) {
    const u = unpadded(id);
    for (const featureId of (u !== null && byUnpadded.get(u)) || []) out.push({ tableId: id, featureId });
  }
  return out;
}

function paddingMessage(report: JoinReport): string {
  const pairs = report.zeroPaddingSuspects.map((s) => `${s.tableId} vs ${s.featureId}`);
  return (
    `${pairs.length} ID(s) differ only by leading zeros (table vs boundary file): ${listSome(pairs)}. ` +
    'They are not matched automatically; store the IDs as text with the same zero padding on both sides.'
  );
}

/**
 * What stops the join. With a table, features the table does not ask for cannot stop it: a blank
 * ID there, or an ID on two features that no row names, only leaves those features out (a
 * national boundary file read for one region's table, water bodies without an ID).
 */
function fatalProblems(report: JoinReport, layerName: string, tableName: string | null, rowWord: string, tableIds: Map<string, number[]> | null, blankNote = ''): string[] {
  const p: string[] = [];
  const rowsOf = (list: number[]) => `${rowWord}${list.length > 1 ? 's' : ''} ${listSome(list)}`;
  if (tableName && report.blankRows.length) p.push(`${tableName}: the ID is blank in ${rowsOf(report.blankRows)}.${blankNote}`);
  if (!tableIds && report.blankFeatures.length) {
    p.push(`${layerName}: the ID is blank for feature${report.blankFeatures.length > 1 ? 's' : ''} ${listSome(report.blankFeatures)}.`);
  }
  if (tableName && report.duplicateRows.length) {
    p.push(`${tableName}: IDs appear more than once: ${listSome(report.duplicateRows.map((d) => `${d.id} (${rowsOf(d.rows)})`))}.`);
  }
  const clashing = tableIds ? report.duplicateFeatures.filter((d) => tableIds.has(d.id)) : report.duplicateFeatures;
  if (clashing.length) {
    p.push(`${layerName}: IDs appear on more than one feature: ${listSome(clashing.map((d) => `${d.id} (features ${d.features.join(', ')})`))}. ` +
      'Merge the parts into one multipolygon per ID, or join by another column.');
  }
  if (tableName && report.unmatchedRows.length) {
    p.push(`${tableName}: ${report.unmatchedRows.length} ${rowWord}(s) have an ID with no feature in ${layerName}: ` +
      `${listSome(report.unmatchedRows.map((u) => `${rowWord} ${u.row} (${u.id})`))}.` +
      (report.zeroPaddingSuspects.length ? ` ${paddingMessage(report)}` : '') + caseHint(report));
  }
  if (report.withoutGeometry.length) {
    p.push(`${layerName}: these features have no geometry: ${listSome(report.withoutGeometry.map((w) => `feature ${w.feature} (${w.id}, ${rowWord} ${w.row})`))}. ` +
      'Remove their rows or repair the boundary file.');
  }
  return p;
}

/** " N of these match … when letter case is ignored …" for the unmatched rows, or "". */
function caseHint(report: JoinReport): string {
  const pairs = caseOnlyPairs(report.unmatchedRows.map((u) => u.id), report.unmatchedFeatures.map((u) => u.id));
  return pairs.length ? ` ${caseMessage(pairs)}` : '';
}
