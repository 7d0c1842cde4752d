/**
 * How a count reads in a message, a warning or a note: whole numbers grouped by threes with a comma
 * ("22,500 areas", "1,048,576 rows"), the same everywhere, whatever the machine's locale. Positions
 * (row 12345, feature 20001) are not counts and are written plainly, as the spreadsheet numbers them.
 */
export function formatCount(n: number): string {
  if (!Number.isSafeInteger(n)) return String(n);
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
