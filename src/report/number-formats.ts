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

/**
 * The format one number is shown in. Four decimals would show a value below 0.0005 as 0.0000 (a
 * coefficient per dollar of income, per person, per 1,000 births), which reads as "no effect": such
 * values, and any four-decimal value below 0.001 in size, take the general format, which keeps their
 * digits and their sign. (A conditional format cannot do this: its catch-all section drops the sign.)
 */
export function cellFormat(format: NumberFormat | undefined, value: number): string {
  const f = format ?? 'decimal4';
  if (f === 'text') return 'General';
  if (f === 'decimal4' && value !== 0 && Math.abs(value) < 0.001) return 'General';
  return EXCEL_FORMAT[f];
}
