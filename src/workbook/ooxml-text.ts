/**
 * Text for a cell of the results workbook. XML cannot carry most control characters, U+FFFE, U+FFFF
 * or lone surrogates; the spreadsheet format writes such a character as _xHHHH_ (ECMA-376 Part 1,
 * §22.9.2.19, ST_Xstring), and protects a literal "_xHHHH_" in the text by writing its underscore as
 * _x005F_. Spreadsheet programs (and exceljs, when it reads) turn both back into the original text.
 * Without this, exceljs drops the control characters when it writes (so "A\u0001B" and "AB" would
 * look the same), writes U+FFFE as it is (the file is then not well-formed), and writes a literal
 * "_x0041_" that a spreadsheet program would show as "A".
 */
const LITERAL_ESCAPE = /_(x[0-9A-Fa-f]{4}_)/g;
const NOT_XML = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

export function ooxmlText(s: string): string {
  if (!s.includes('_x') && !NOT_XML.test(s)) return s;
  NOT_XML.lastIndex = 0;
  return s
    .replace(LITERAL_ESCAPE, '_x005F_$1')
    .replace(NOT_XML, (c) => `_x${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}_`);
}
