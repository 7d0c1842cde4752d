/**
 * The steps before any model: read the files, join the table to the areas, take the model's columns
 * (leaving out rows with missing values when asked), find the neighbours, and lay out the design.
 */
import { readBoundary, readTable, tableFromLayer, joinAreas, decodeText } from '../geo/index.js';
import type { JoinedAreas } from '../geo/types.js';
import { buildWeights, readEdgeList, subsetWeights } from '../weights/index.js';
import type { SpatialWeights } from '../weights/types.js';
import type { Design } from '../core/types.js';
import { designWithIntercept } from '../models/index.js';
import { InputError } from '../errors.js';
import { sha256Hex } from './hash.js';
import { readModelColumns } from './missing.js';
import { columnsWithRates } from './rates.js';
import { builtRateParts, rateParts, ratePartWarning } from './rate-parts.js';
import { checkModelColumns } from './check-values.js';
import { withReadNotes } from './read-notes.js';
import type { AnalysisRequest, InputRecord } from './types.js';
import { formatCount } from '../core/count.js';

export interface PreparedAreas {
  /** each input file with its size and fingerprint */
  inputs: InputRecord[];
  /** the boundary file's ID property, when named differently from the table's column */
  boundaryId?: string;
  /** the boundary file's name, for messages */
  boundaryName: string;
  /** every joined area, before rows with missing values are left out */
  joinedAll: JoinedAreas;
  /** the areas analysed */
  joined: JoinedAreas;
  /** the model's columns (and any extra column asked for), one value per analysed area */
  values: Map<string, Float64Array>;
  /** rows left out for missing values */
  dropped: { row: number; id: string; columns: string[] }[];
  /** explanatory columns that are the outcome rate's own counts, as warnings */
  rateWarnings: string[];
  /** the label column asked for, if any */
  labelColumn?: string;
  /** its text per analysed area (when a label column was asked for), in the same order as `joined` */
  labels?: string[];
}

/**
 * Reads the files and joins them: `extraColumns` are columns beyond y and x to read with them (a
 * column the local statistics look at). Calls `lap` after reading and after joining.
 */
export async function prepareAreas(request: AnalysisRequest, extraColumns: string[], lap: (stage: string) => void = () => {}): Promise<PreparedAreas> {
  const inputs: InputRecord[] = [];
  for (const f of request.boundary) inputs.push(await record('boundary', f));
  if (request.data) inputs.push(await record('data', request.data));
  if (request.edgeList) inputs.push(await record('edge list', request.edgeList));

  const maxBytes = request.maxBytes;
  const { layer, table } = await readLayerAndTable(request);
  if (request.edgeList && maxBytes !== undefined && request.edgeList.bytes.length > maxBytes) {
    throw new InputError(`${request.edgeList.name} is ${formatCount(request.edgeList.bytes.length)} bytes, over the ${formatCount(maxBytes)}-byte limit for neighbour lists.`, { file: request.edgeList.name });
  }
  lap('read');
  const boundaryId = request.boundaryId?.trim() || undefined;
  // how the files were read (an encoding guessed, a code page, merged cells) often explains a refusal of the join or the columns
  const readNotes = [...(layer.readNotes ?? []), ...(request.data ? table.warnings ?? [] : [])];
  const joinedAll = withReadNotes(readNotes, () => joinAreas(layer, table, request.id, { featureIdProperty: boundaryId, ignoreLeadingZeros: request.idsIgnoreLeadingZeros ?? false }));
  const labelColumn = request.label?.trim() || undefined;
  if (labelColumn) joinedAll.column(labelColumn); // an unknown label column is refused before any work
  const { joined, values, dropped } = withReadNotes(readNotes, () => readModelColumns(joinedAll, columnsWithRates([request.y, ...request.x, ...extraColumns], request.rates), request.dropMissing ?? false));
  checkModelColumns(values, joined);
  const rateWarnings = ratePartWarnings(request, joined);
  const labels = labelColumn ? joined.column(labelColumn).map((c) => (c === null ? '' : String(c).trim())) : undefined;
  lap('join');
  return {
    inputs, ...(boundaryId ? { boundaryId } : {}), boundaryName: layer.sourceName, joinedAll, joined, values, dropped, rateWarnings,
    ...(labelColumn ? { labelColumn, labels } : {}),
  };
}

/**
 * Explanatory columns that are the outcome rate's own numerator or denominator (issue 11, §3): known
 * when the outcome is a rate built by the request, else read from the values and names of the table's
 * columns of numbers.
 */
function ratePartWarnings(request: AnalysisRequest, joined: JoinedAreas): string[] {
  const built = request.rates?.recipes.find((r) => r.name === request.y);
  if (built) return builtRateParts(built, request.x).map((f) => ratePartWarning(f, request.y));
  const column = (name: string): readonly unknown[] | undefined => (joined.columnNames.includes(name) ? joined.column(name) : undefined);
  // the columns of numbers (blanks allowed) that may be the rate's other count
  const isNumber = (v: unknown) => v === null || typeof v === 'number' || (typeof v === 'string' && (v.trim() === '' || Number.isFinite(Number(v))));
  const numeric = joined.columnNames.filter((c) => c !== request.y && c !== request.id && column(c)!.every(isNumber));
  return rateParts(column, request.y, request.x, numeric).map((f) => ratePartWarning(f, request.y));
}

/** The boundary layer and the data table (the layer's own attributes when no table file is given). */
export async function readLayerAndTable(files: Pick<AnalysisRequest, 'boundary' | 'layer' | 'coordinates' | 'data' | 'sheet' | 'maxBytes'>) {
  const layer = await readBoundary(files.boundary, { layer: files.layer, coordinates: files.coordinates, maxBytes: files.maxBytes });
  const table = files.data ? await readTable(files.data, { sheet: files.sheet, maxBytes: files.maxBytes }) : tableFromLayer(layer);
  return { layer, table };
}

/**
 * The run's neighbours: read from the edge list when one was given (on every joined area, then
 * without the rows left out), else built by the request's rule.
 */
export function neighboursOf(request: AnalysisRequest, areas: PreparedAreas, points: { x: Float64Array; y: Float64Array }): SpatialWeights {
  const { joined, joinedAll, dropped } = areas;
  if (!request.edgeList) {
    return buildWeights(
      { ids: joined.ids, geometries: joined.geometries, coordinates: joined.coordinates, points },
      request.weights,
      { transform: request.transform, linkUnneighboured: request.linkUnneighboured },
    );
  }
  const text = decodeText(request.edgeList.bytes, request.edgeList.name, { kind: 'a neighbour list (CSV)', latinFallback: true }).text;
  const listOpts = { transform: request.transform, source: request.edgeList.name };
  if (dropped.length === 0) return readEdgeList(text, joined.ids, listOpts);
  // The list names the areas of the whole table: read it on all of them, then leave out the dropped rows.
  const position = new Map(joinedAll.ids.map((id, i) => [id, i]));
  return subsetWeights(readEdgeList(text, joinedAll.ids, listOpts), joined.ids.map((id) => position.get(id)!));
}

/** The design: an intercept and the explanatory columns in the order given. */
export function designOf(x: string[], values: Map<string, Float64Array>, n: number): Design {
  return designWithIntercept(x, x.map((c) => values.get(c)!), n);
}

async function record(role: InputRecord['role'], f: { name: string; bytes: Uint8Array }): Promise<InputRecord> {
  return { role, name: f.name, bytes: f.bytes.length, sha256: await sha256Hex(f.bytes) };
}
