/** What the sidebar needs from where it runs: Excel (through the adapter) or the plain browser page. */
import type { NamedBytesLike } from '../../src/pipeline/index.js';
import type { EngineClient } from './engine-client.js';
import type { BoundaryFile, RunOutput, SavedSetup, TableSnapshot } from './types.js';

export interface TableSource {
  table: TableSnapshot;
  /**
   * 'sheet': read from a sheet of the open workbook, so the engine's row numbers are that sheet's rows
   * and a problem can be shown at its cell; 'file': read from a file the user opened.
   */
  origin: 'sheet' | 'file';
  /** the bytes the engine reads the table from, and the sheet within them */
  file: NamedBytesLike;
  sheet?: string;
}

export interface WriteOutcome {
  message: string;
  /** a file to save (the browser page) */
  download?: { url: string; fileName: string };
}

export interface SidebarHost {
  kind: 'excel' | 'page';
  /**
   * Excel: reads the active sheet when asked. The page: draws its own "open a workbook" control into
   * `slot` and calls `provide` whenever a sheet is chosen.
   */
  dataSource(slot: HTMLElement, provide: (source: TableSource) => void, fail: (e: unknown) => void, engine: EngineClient): void;
  loadSetup(): Promise<SavedSetup | null>;
  saveSetup(setup: SavedSetup): Promise<void>;
  /** boundary files kept in the document from an earlier run, if any */
  loadBoundary(): Promise<BoundaryFile[] | null>;
  /** Keeps the boundary files in the document; rejects with a message for the analyst when they are not kept. */
  storeBoundary(files: BoundaryFile[]): Promise<void>;
  writeResults(output: RunOutput, engine: EngineClient, stage: (text: string) => void): Promise<WriteOutcome>;
  /** Selects a cell in the host, when it can (Excel). */
  showCell?(sheet: string, address: string): Promise<void>;
}
