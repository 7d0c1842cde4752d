import type { Block } from './types.js';

/** Rows a block takes on a sheet: shared by the report (to place pictures) and the workbook writer. */
export function blockHeight(block: Block): number {
  switch (block.kind) {
    case 'title':
    case 'paragraph':
      return 1;
    case 'table':
      return 2 + block.rows.length + (block.note ? 1 : 0);
    case 'keyValues':
      return 1 + block.rows.length;
    case 'space':
      return block.rows;
  }
}

/** Blank rows left between two blocks. */
export const BLOCK_GAP = 1;

/** 1-based first row of each block, and the last row used. Blocks start at row 1. */
export function layoutBlocks(blocks: readonly Block[]): { starts: number[]; lastRow: number } {
  const starts: number[] = [];
  let row = 1;
  for (const b of blocks) {
    starts.push(row);
    row += blockHeight(b) + BLOCK_GAP;
  }
  return { starts, lastRow: blocks.length ? row - 1 - BLOCK_GAP : 0 };
}

/** Default row height in pixels (15 points), used to stack pictures below the blocks. */
export const ROW_HEIGHT_PX = 20;
