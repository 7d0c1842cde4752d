/** Joins table rows to boundary features by an ID column; the table's row order is kept. */
import { InputError, listSome, nearestName } from '../errors.js';
import type { AreaGeometry, AreaLayer, DataTable, JoinReport, JoinedAreas } from './types.js';
import type { Cell } from './table-shape.js';
import { idText, toCell, unpadded } from './ids.js';
import { caseMessage, caseOnlyPairs, lookAlikeMessage, lookAlikePairs, refuseIdsNotText } from './id-checks.js';
import { formulaNote } from './formula-note.js';
import { formatCount } from '../core/count.js';

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
    blankRows: [], blankFeatures: [], withoutGeometry: [], zeroPaddingSuspects: [], matchedIgnoringZeros: [],
  };
}

export interface JoinOptions {
  /** the boundary file's property holding the IDs, when it is named differently from `idColumn` */
  featureIdProperty?: string;
  /**
   * Match all-digit IDs that differ only by leading zeros ("005" with "5", "01001" with "1001").
   * Off by default: such pairs refuse the join until the analyst asks for this, and it is recorded.
   */
  ignoreLeadingZeros?: boolean;
}

/** The option's name on the command line and in the sidebar, for messages. */
/** Where the sidebar and the browser page take the boundary file's ID property, said beside --boundary-id. */
const IN_SIDEBAR = '; in the sidebar, "ID in the boundary file" under Areas';

export const IGNORE_ZEROS_OPTION = '--ids-ignore-leading-zeros; in the sidebar, tick "match 01001 with 1001"';

export function joinAreas(
  layer: AreaLayer,
  table: DataTable | null,
  idColumn: string,
  opts: JoinOptions = {},
): JoinedAreas {
  const featureProp = opts.featureIdProperty ?? idColumn;
  // with the option, an all-digit ID is compared without its leading zeros
  const key = (id: string): string => (opts.ignoreLeadingZeros ? unpadded(id) ?? id : id);
  // a separate table is checked first; the boundary file's own attributes are checked as its properties below
  if (table && !table.rowsAreFeatures && table.columns.indexOf(idColumn) < 0) {
    const near = nearestName(idColumn, table.columns);
    throw new InputError(
      `${table.sourceName} has no column "${idColumn}" to join by${near ? `; did you mean "${near}"? Its` : '; its'} columns are ${listSome(table.columns.map((n) => `"${n}"`), 30)}.`,
      { file: table.sourceName, column: idColumn },
    );
  }
  if (!layer.propertyNames.includes(featureProp)) {
    const near = nearestName(featureProp, layer.propertyNames);
    let advice = near ? `; did you mean "${near}"? Its` : '; its';
    let after = '';
    if (table && !opts.featureIdProperty) {
      // the table has the column; only the boundary file names its IDs differently
      const best = idPropertyCandidates(layer, table, idColumn)[0];
      const pick = best?.property ?? near;
      after = best
        ? ` Its property "${best.property}" holds ${best.matches} of the ${best.rows} IDs in ${table.sourceName}'s "${idColumn}": name it as the boundary file's ID (--boundary-id ${quoteArg(best.property)}${IN_SIDEBAR}) to join by it.`
        : ` If it holds the same IDs under another name, name that property as the boundary file's ID (--boundary-id ${pick ? quoteArg(pick) : 'NAME'}${IN_SIDEBAR}).`;
    } else if (opts.featureIdProperty && near) {
      after = ` Name the boundary file's ID as --boundary-id ${quoteArg(near)}${IN_SIDEBAR}.`;
    }
    throw new InputError(
      `${layer.sourceName} has no property "${featureProp}" to join by${advice} properties are ${listSome(layer.propertyNames.map((n) => `"${n}"`), 30)}.${after}`,
      { file: layer.sourceName, column: featureProp },
    );
  }
  const report = emptyJoinReport();
  const areas = layer.areas;
  const featureIds = areas.map((a) => idText(a.properties[featureProp]));
  const byFeatureId = new Map<string, number[]>();
  featureIds.forEach((id, i) => {
    if (id === null) report.blankFeatures.push(areas[i].feature);
    else byFeatureId.set(key(id), [...(byFeatureId.get(key(id)) ?? []), i]);
  });
  for (const [k, list] of byFeatureId) {
    if (list.length > 1) report.duplicateFeatures.push({ id: sameOrBoth(list.map((i) => featureIds[i]!), k), features: list.map((i) => areas[i].feature) });
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
    const rowIds = table.rows.map((r) => idText(r[col]));
    rowIds.forEach((id, i) => {
      if (id === null) report.blankRows.push(rowNo(i));
      else byRowId.set(key(id), [...(byRowId.get(key(id)) ?? []), i]);
    });
    ids = [];
    rows = [];
    featureIndex = [];
    tableIndex = [];
    const matched = new Set<number>();
    for (const [k, list] of byRowId) {
      if (list.length > 1) report.duplicateRows.push({ id: sameOrBoth(list.map((i) => rowIds[i]!), k), rows: list.map(rowNo) });
    }
    rowIds.forEach((id, i) => {
      if (id === null) return;
      const hit = byFeatureId.get(key(id));
      if (!hit) {
        report.unmatchedRows.push({ row: rowNo(i), id });
        return;
      }
      const f = hit[0];
      if (featureIds[f] !== id) report.matchedIgnoringZeros.push({ tableId: id, featureId: featureIds[f]! });
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
      `${formatCount(report.unmatchedFeatures.length)} feature(s) of ${layer.sourceName} have no row in ${table!.sourceName} and are left out ` +
        `(they will not count as anyone's neighbour): ${listSome(report.unmatchedFeatures.map((u) => `feature ${u.feature} (${u.id})`))}.`,
    );
  }
  if (report.zeroPaddingSuspects.length > 0) warnings.push(paddingMessage(report));
  if (report.matchedIgnoringZeros.length > 0) {
    const pairs = report.matchedIgnoringZeros.map((m) => `${m.tableId} with ${m.featureId}`);
    warnings.push(`${formatCount(pairs.length)} ID(s) were matched ignoring leading zeros, as asked (table with boundary file): ${listSome(pairs)}.`);
  }
  if (table && report.blankFeatures.length > 0) {
    warnings.push(`${formatCount(report.blankFeatures.length)} feature(s) of ${layer.sourceName} have a blank ID and are left out: features ${listSome(report.blankFeatures)}.`);
  }

  const columnNames = table ? [...table.columns] : [];
  for (const n of layer.propertyNames) if (!columnNames.includes(n)) columnNames.push(n);
  const source = table?.sourceName ?? layer.sourceName;
  const column = (name: string): Cell[] => {
    const k = table ? table.columns.indexOf(name) : -1;
    if (k >= 0) return tableIndex!.map((i) => table!.rows[i][k] ?? null);
    if (layer.propertyNames.includes(name)) return featureIndex.map((f) => toCell(areas[f].properties[name]));
    // with a table, name the table's own columns (the boundary file's properties are searched too, said once)
    const listed = table ? table.columns : columnNames;
    const near = nearestName(name, columnNames);
    throw new InputError(
      `There is no column "${name}" in ${source}${table ? ` (nor a property "${name}" in ${layer.sourceName})` : ''}` +
        `${near ? `; did you mean "${near}"? Its` : '; its'} columns are ${listSome(listed.map((n) => `"${n}"`), 30)}.`,
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
    ...(layer.coordinateUnit ? { coordinateUnit: layer.coordinateUnit } : {}),
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
    `${formatCount(pairs.length)} ID(s) differ only by leading zeros (table vs boundary file): ${listSome(pairs)}. ` +
    'They are not matched automatically: store the IDs as text with the same zero padding on both sides, ' +
    `or ask for IDs to be matched ignoring leading zeros (${IGNORE_ZEROS_OPTION}).`
  );
}

/** The ID as the report shows it: one text, or the texts that met under the leading-zeros option. */
function sameOrBoth(texts: string[], key: string): string {
  const distinct = [...new Set(texts)];
  return distinct.length === 1 ? distinct[0] : `${key} (written ${distinct.join(', ')})`;
}

/** A command-line argument, quoted when it holds spaces. */
function quoteArg(s: string): string {
  return /^[\w.\-]+$/.test(s) ? s : `"${s}"`;
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
    p.push(`${tableName}: ${formatCount(report.unmatchedRows.length)} ${rowWord}(s) have an ID with no feature in ${layerName}: ` +
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
  const rows = report.unmatchedRows.map((u) => u.id);
  const features = report.unmatchedFeatures.map((u) => u.id);
  const pairs = caseOnlyPairs(rows, features);
  const alike = lookAlikePairs(rows, features);
  return (pairs.length ? ` ${caseMessage(pairs)}` : '') + (alike.length ? ` ${lookAlikeMessage(alike)}` : '');
}
