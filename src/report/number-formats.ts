import type { NumberFormat } from './types.js';

/** Excel number formats for the report's formats. Values stay full-precision numbers; only the display changes. */
export const EXCEL_FORMAT: Record<NumberFormat, string> = {
  integer: '0',
  decimal2: '0.00',
  decimal4: '0.0000',
  scientific: '0.00E+00',
  // very small p-values show as "<0.0001" instead of a misleading 0.0000
  pvalue: '[<0.0001]"<0.0001";0.0000',
  percent: '0.0%',
  text: '@',
};

/** The one format of every small number, in every writer: four significant digits and the power of ten. */
export const SMALL_FORMAT = '0.000E+00';

/** A number that a four-decimal column shows in SMALL_FORMAT: not zero, and below 0.001 in size. */
export function isSmall(value: number): boolean {
  return value !== 0 && Number.isFinite(value) && Math.abs(value) < 0.001;
}

/**
 * The format one number is shown in. Four decimals would show a value below 0.0005 as 0.0000 (a
 * coefficient per dollar of income, per person, per 1,000 births), which reads as "no effect": such
 * values, and any four-decimal value below 0.001 in size, are shown as 7.924E-04, the same width and
 * look in every column and every writer (the cell-by-cell one and the streamed rows, stream-rows.ts).
 * (A conditional format cannot do this: its catch-all section drops the sign.)
 */
export function cellFormat(format: NumberFormat | undefined, value: number): string {
  const f = format ?? 'decimal4';
  if (f === 'text') return 'General';
  if (f === 'decimal4' && isSmall(value)) return SMALL_FORMAT;
  return EXCEL_FORMAT[f];
}
