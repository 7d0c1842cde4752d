/** The layout of the tables of tests on the checks sheet: one row per test, with what it asks. */
import type { TestResult } from '../models/types.js';
import type { Cell, TableColumn } from './types.js';
import { num } from './format.js';

export const TEST_COLUMNS: TableColumn[] = [
  { header: 'Check', format: 'text', width: 44 },
  { header: 'Statistic', format: 'decimal4', width: 12 },
  { header: 'Degrees of freedom', format: 'integer', width: 10 },
  { header: 'p-value', format: 'pvalue', width: 11 },
  { header: 'What it asks', format: 'text', width: 24 },
];

export function testRow(label: string, t: TestResult | undefined, meaning: string): Cell[] {
  return [label, num(t?.stat), num(t?.df), num(t?.p), meaning];
}
