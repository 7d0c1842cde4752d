import type { NumberFormat } from '../report/index.js';

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
