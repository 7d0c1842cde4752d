/** A polygonal area: polygons → rings → [x, y] positions (GeoJSON MultiPolygon order, rings closed). */
export interface PolygonGeometry {
  kind: 'polygon';
  polygons: number[][][][];
}

export interface PointGeometry {
  kind: 'point';
  point: [number, number];
}

export type AreaGeometry = PolygonGeometry | PointGeometry;

export interface Area {
  /** 1-based feature number in the source file, used in messages. */
  feature: number;
  geometry: AreaGeometry | null;
  properties: Record<string, unknown>;
}

export type CoordinateKind = 'geographic' | 'projected';

/** Everything read from one boundary file. */
export interface AreaLayer {
  sourceName: string;
  areas: Area[];
  /** Attribute names found on the features, in file order. */
  propertyNames: string[];
  coordinates: CoordinateKind;
  /** Why we believe the coordinates are geographic or projected (from .prj, CRS member, or ranges). */
  coordinateEvidence: string;
  /** True when neither the file nor the analyst stated the kind and it was guessed. */
  coordinatesGuessed?: boolean;
  /** Projected coordinates: their length unit when the file states it (metres, feet). */
  coordinateUnit?: 'metre' | 'foot' | 'us-foot';
  /** Non-fatal findings worth showing the analyst (e.g. repaired ring closure). */
  warnings: string[];
  /** The warnings about how the file was read (text encoding, code page, deleted records): added to a later refusal's message. */
  readNotes?: string[];
}

/** A data table read from CSV or an .xlsx sheet. Cells keep their raw value; parsing to numbers happens at use. */
export interface DataTable {
  sourceName: string;
  sheet?: string;
  columns: string[];
  rows: (string | number | boolean | null)[][];
  /** Row number (as the user sees it) of the first data row; header is the row before. */
  firstRow: number;
  /** How many columns, blank from top to bottom, were skipped on the left (the first column's position is this + 1). */
  columnOffset?: number;
  /** User-visible row number of each entry of `rows` when blank rows were skipped (else firstRow + i). */
  rowNumbers?: number[];
  /** True when the rows are the features of a boundary file (row numbers are feature numbers). */
  rowsAreFeatures?: boolean;
  /** True for semicolon-separated text, where "3,5" means 3.5. */
  decimalComma?: boolean;
  /** Non-fatal findings while reading (e.g. text encoding fallback). */
  warnings?: string[];
  /** .xlsx cells holding a formula without a saved result, by column name: their user-visible rows. */
  formulasWithoutResult?: Map<string, number[]>;
  /** For text read with decimal commas: the file also shows dots used as decimal points (and no decimal commas). */
  dotDecimals?: boolean;
}

export interface JoinReport {
  /** Rows of the table whose ID has no feature (user-visible row numbers). */
  unmatchedRows: { row: number; id: string }[];
  /** Features whose ID has no table row. */
  unmatchedFeatures: { feature: number; id: string }[];
  duplicateRows: { id: string; rows: number[] }[];
  duplicateFeatures: { id: string; features: number[] }[];
  blankRows: number[];
  blankFeatures: number[];
  /** Matched areas whose feature has no geometry. */
  withoutGeometry: { id: string; row: number; feature: number }[];
  /** IDs that would match if leading zeros were ignored (e.g. 01001 vs 1001): reported, never guessed. */
  zeroPaddingSuspects: { tableId: string; featureId: string }[];
  /** IDs matched although their leading zeros differ, because the analyst asked for it (table ID with feature ID). */
  matchedIgnoringZeros: { tableId: string; featureId: string }[];
}

/** The analysis set: one entry per table row, in the table's row order. */
export interface JoinedAreas {
  ids: string[];
  geometries: AreaGeometry[];
  /** user-visible table row for each area (or feature number when no table was given) */
  rows: number[];
  /** Column accessor over the joined rows: raw cell values in row order. */
  column(name: string): (string | number | boolean | null)[];
  columnNames: string[];
  coordinates: CoordinateKind;
  coordinateEvidence: string;
  coordinatesGuessed?: boolean;
  coordinateUnit?: 'metre' | 'foot' | 'us-foot';
  report: JoinReport;
  warnings: string[];
  /** 'feature' when `rows` holds feature numbers (no table, or the boundary file's own table). */
  rowKind?: 'row' | 'feature';
  /** Carried from the table: "3,5" reads as 3.5. */
  decimalComma?: boolean;
  /** Carried from the table (see DataTable.dotDecimals). */
  dotDecimals?: boolean;
  /** Carried from the table: formula cells without a saved result, by column name (user-visible rows). */
  formulasWithoutResult?: Map<string, number[]>;
}
