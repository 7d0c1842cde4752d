/**
 * The part of the Excel JavaScript API the adapter uses, written out as interfaces so the adapter
 * can be checked in Node against an in-memory stand-in (test/helpers/fake-excel.ts). Names and
 * semantics are Office.js's own: proxies queue commands, properties are readable only after
 * load() and context.sync(). addin/excel/conformance.ts checks the real typings fit these.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */

export interface FontLike { bold: boolean; italic: boolean; color: string; size: number }
export interface RangeFormatLike {
  font: FontLike;
  fill: { color: string };
  wrapText: boolean;
  columnWidth: number;
  rowHeight: number;
  verticalAlignment: string;
  horizontalAlignment: string;
  indentLevel: number;
}

export interface RangeLike {
  values: any[][];
  numberFormat: any[][];
  readonly address: string;
  readonly rowIndex: number;
  readonly columnIndex: number;
  readonly rowCount: number;
  readonly columnCount: number;
  readonly isNullObject: boolean;
  readonly format: RangeFormatLike;
  load(propertyNames?: string | string[]): RangeLike;
  merge(across?: boolean): void;
  select(): void;
}

export interface TableLike { readonly name: string; getRange(): RangeLike }

export interface ShapeLike { left: number; top: number; width: number; height: number; name: string; altTextDescription: string }

export interface ChartLike {
  name: string;
  top: number;
  left: number;
  width: number;
  height: number;
  readonly title: { text: string };
  readonly legend: { visible: boolean };
  readonly axes: { readonly categoryAxis: { readonly title: { text: string } }; readonly valueAxis: { readonly title: { text: string } } };
  readonly series: { getItemAt(index: number): { markerSize: number; readonly trendlines: { add(type?: any): unknown } } };
}

/** A sheet's printed page set-up (ExcelApi 1.9): margins go in through setPrintMargins with their unit. */
export interface PageLayoutLike {
  orientation: string;
  zoom: { horizontalFitToPages?: number; verticalFitToPages?: number; scale?: number };
  setPrintMargins(unit: 'Points' | 'Inches' | 'Centimeters', marginOptions: { left?: number; right?: number; top?: number; bottom?: number; header?: number; footer?: number }): void;
  /** whole rows, e.g. "$3:$4" */
  setPrintTitleRows(printTitleRows: RangeLike | string): void;
  /** whole columns, e.g. "$A:$C" */
  setPrintTitleColumns(printTitleColumns: RangeLike | string): void;
}

/** A sheet's manual page breaks (ExcelApi 1.9): add() breaks before the range's top-left cell. */
export interface PageBreaksLike { add(pageBreakRange: RangeLike | string): unknown }

export interface WorksheetLike {
  readonly name: string;
  readonly isNullObject: boolean;
  readonly tables: { readonly items: TableLike[]; load(propertyNames?: string | string[]): unknown };
  readonly freezePanes: { freezeRows(count?: number): void };
  readonly shapes: { addImage(base64ImageString: string): ShapeLike };
  readonly charts: { add(type: any, sourceData: RangeLike, seriesBy?: any): ChartLike };
  /** ExcelApi 1.9: use only where the requirement set is there (adapter.ts) */
  readonly pageLayout: PageLayoutLike;
  readonly horizontalPageBreaks: PageBreaksLike;
  load(propertyNames?: string | string[]): WorksheetLike;
  getRange(address?: string): RangeLike;
  getRangeByIndexes(startRow: number, startColumn: number, rowCount: number, columnCount: number): RangeLike;
  getUsedRangeOrNullObject(valuesOnly?: boolean): RangeLike;
  activate(): void;
  delete(): void;
}

export interface CustomXmlPartLike { readonly id: string; readonly isNullObject: boolean; getXml(): { readonly value: string }; delete(): void }

export interface WorkbookLike {
  readonly worksheets: {
    readonly items: WorksheetLike[];
    add(name?: string): WorksheetLike;
    getActiveWorksheet(): WorksheetLike;
    getItemOrNullObject(key: string): WorksheetLike;
    load(propertyNames?: string | string[]): unknown;
  };
  readonly settings: {
    add(key: string, value: any): unknown;
    getItemOrNullObject(key: string): { readonly isNullObject: boolean; readonly value: any; load(propertyNames?: string | string[]): unknown };
  };
  readonly customXmlParts: {
    add(xml: string): CustomXmlPartLike;
    getByNamespace(namespaceUri: string): { readonly items: CustomXmlPartLike[]; load(propertyNames?: string | string[]): unknown };
  };
}

export interface ContextLike { readonly workbook: WorkbookLike; sync(): Promise<void> }

/**
 * Excel.run, as the adapter calls it. `repeatable` marks a batch that may safely be sent again from
 * the start (it only reads, or deletes what it finds): see run.ts.
 */
export type ExcelRunner = <T>(batch: (context: ContextLike) => Promise<T>, how?: { repeatable?: boolean }) => Promise<T>;

/** The run options the add-in uses ("Delay execution while cell is being edited"; ExcelApi 1.11). */
export interface RunOptionsLike { delayForCellEdit?: boolean }

/** Excel.run as Office offers it: with or without run options. */
export interface OfficeExcelRun {
  <T>(batch: (context: ContextLike) => Promise<T>): Promise<T>;
  <T>(options: RunOptionsLike, batch: (context: ContextLike) => Promise<T>): Promise<T>;
}
