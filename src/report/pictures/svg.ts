/** Small helpers for writing SVG as text (no DOM, so the same code runs in Node and the browser). */

export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Coordinates to one decimal place keep files small with no visible loss. */
export function c1(x: number): string {
  return (Math.round(x * 10) / 10).toString();
}

export const FONT = 'font-family="sans-serif"';

export function text(x: number, y: number, s: string, attrs = ''): string {
  return `<text x="${c1(x)}" y="${c1(y)}" ${FONT} ${attrs}>${escapeXml(s)}</text>`;
}

export function svgDocument(width: number, height: number, body: string[], title: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img">` +
    `<title>${escapeXml(title)}</title><rect width="${width}" height="${height}" fill="#ffffff"/>${body.join('')}</svg>`;
}

/** Splits a phrase into lines of at most `max` characters, at spaces. */
export function wrapWords(s: string, max: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const w of s.split(/\s+/)) {
    if (line && line.length + 1 + w.length > max) { lines.push(line); line = w; } else line = line ? `${line} ${w}` : w;
  }
  if (line) lines.push(line);
  return lines;
}

/** A number for a label: compact, with a true minus sign. */
export function label(x: number): string {
  const a = Math.abs(x);
  let s: string;
  if (a === 0) s = '0';
  else if (a >= 1e5 || a < 1e-3) s = x.toExponential(1);
  else if (a >= 100) s = x.toFixed(0);
  else if (a >= 10) s = x.toFixed(1);
  else s = x.toFixed(2);
  return s.replace('-', '−');
}
