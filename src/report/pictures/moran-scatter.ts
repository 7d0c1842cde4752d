import type { Picture } from './choropleth.js';
import { c1, escapeXml, svgDocument, text } from './svg.js';
import { formatCount } from '../../core/count.js';

export interface Edges {
  from: Int32Array;
  to: Int32Array;
  weight: Float64Array;
}

export interface ScatterData {
  /** standardised values (mean 0, population sd 1), areas without neighbours left out */
  z: Float64Array;
  /** neighbours' weighted average of z, with each area's weights rescaled to sum to 1 */
  lag: Float64Array;
  /** least-squares slope of lag on z through the origin: Moran's I under row-standardised weights */
  slope: number;
  leftOut: number;
  /** the area (index in table order) of each point */
  areas: Int32Array;
}

/**
 * Points of a Moran scatter plot. The slope z'Lz / z'z of the row-standardised lag on z equals
 * Moran's I with row-standardised weights (Anselin 1996, on the Moran scatterplot).
 */
export function moranScatterData(values: ArrayLike<number>, edges: Edges): ScatterData {
  const n = values.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += values[i];
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (values[i] - mean) ** 2;
  const sd = Math.sqrt(ss / n) || 1;
  const z = Float64Array.from({ length: n }, (_, i) => (values[i] - mean) / sd);
  const sum = new Float64Array(n), wsum = new Float64Array(n);
  for (let e = 0; e < edges.from.length; e++) {
    sum[edges.from[e]] += edges.weight[e] * z[edges.to[e]];
    wsum[edges.from[e]] += edges.weight[e];
  }
  const keep: number[] = [];
  for (let i = 0; i < n; i++) if (wsum[i] > 0) keep.push(i);
  const zk = Float64Array.from(keep, (i) => z[i]);
  const lk = Float64Array.from(keep, (i) => sum[i] / wsum[i]);
  let num = 0, den = 0;
  for (let i = 0; i < zk.length; i++) { num += zk[i] * lk[i]; den += zk[i] * zk[i]; }
  return { z: zk, lag: lk, slope: den > 0 ? num / den : 0, leftOut: n - keep.length, areas: Int32Array.from(keep) };
}

const SIZE = 460, M = { left: 62, right: 20, top: 44, bottom: 70 };

/** Above this many points the plot shows how many areas fall in each small square instead of one dot per area. */
export const MANY_POINTS = 20_000;
/** Side of a density square, in pixels. */
const BIN_PX = 2;
/** Lower edges of the density classes (areas per square) and their shades, pale to dark. */
const DENSITY_FROM = [1, 2, 5, 15, 50];
const DENSITY_FILL = ['#a9c6e2', '#6f9fcb', '#3f74a8', '#1b4470', '#0b2038'];
const DENSITY_LEGEND_PX = 24;

/** One path per density class: each occupied square of the plot, shaded by how many points fall in it. */
function densitySquares(data: ScatterData, sx: (v: number) => number, sy: (v: number) => number): { body: string[]; squares: number } {
  const side = Math.ceil(SIZE / BIN_PX);
  const counts = new Uint32Array(side * side);
  for (let i = 0; i < data.z.length; i++) {
    const bx = Math.min(side - 1, Math.max(0, Math.floor((sx(data.z[i]) - M.left) / BIN_PX)));
    const by = Math.min(side - 1, Math.max(0, Math.floor((sy(data.lag[i]) - M.top) / BIN_PX)));
    counts[by * side + bx]++;
  }
  const paths: string[][] = DENSITY_FROM.map(() => []);
  let squares = 0;
  for (let b = 0; b < counts.length; b++) {
    const c = counts[b];
    if (!c) continue;
    squares++;
    let k = DENSITY_FROM.length - 1;
    while (c < DENSITY_FROM[k]) k--;
    paths[k].push(`M${M.left + (b % side) * BIN_PX} ${M.top + Math.floor(b / side) * BIN_PX}h${BIN_PX}v${BIN_PX}h-${BIN_PX}Z`);
  }
  return { body: paths.map((p, k) => (p.length ? `<path d="${p.join('')}" fill="${DENSITY_FILL[k]}"/>` : '')).filter(Boolean), squares };
}

export function moranScatterSvg(valueName: string, data: ScatterData, slopeLabel: string): Picture {
  const dense = data.z.length > MANY_POINTS;
  const W = M.left + SIZE + M.right, H = M.top + SIZE + M.bottom + (dense ? DENSITY_LEGEND_PX : 0);
  let ext = 1;
  for (let i = 0; i < data.z.length; i++) ext = Math.max(ext, Math.abs(data.z[i]), Math.abs(data.lag[i]));
  ext = Math.ceil(ext * 1.1 * 2) / 2;
  const sx = (v: number) => M.left + ((v + ext) / (2 * ext)) * SIZE;
  const sy = (v: number) => M.top + ((ext - v) / (2 * ext)) * SIZE;
  const title = `Moran scatter plot of ${valueName}`;
  const body: string[] = [text(10, 24, title, 'font-size="16" font-weight="bold"')];
  body.push(`<rect x="${M.left}" y="${M.top}" width="${SIZE}" height="${SIZE}" fill="#fbfbfb" stroke="#999999"/>`);
  // ticks every whole unit of standard deviation
  for (let t = -Math.floor(ext); t <= Math.floor(ext); t++) {
    body.push(`<path d="M${c1(sx(t))} ${M.top + SIZE}v5M${M.left} ${c1(sy(t))}h-5" stroke="#999999"/>`);
    const tl = String(t).replace('-', '−');
    body.push(text(sx(t), M.top + SIZE + 18, tl, 'font-size="11" text-anchor="middle" fill="#333333"'));
    body.push(text(M.left - 8, sy(t) + 4, tl, 'font-size="11" text-anchor="end" fill="#333333"'));
  }
  body.push(`<path d="M${c1(sx(0))} ${M.top}V${M.top + SIZE}M${M.left} ${c1(sy(0))}H${M.left + SIZE}" stroke="#777777" stroke-dasharray="4 3"/>`);
  const q = 'font-size="11" fill="#777777"';
  body.push(text(M.left + SIZE - 6, M.top + 16, 'high beside high', `${q} text-anchor="end"`));
  body.push(text(M.left + 6, M.top + SIZE - 8, 'low beside low', q));
  body.push(text(M.left + 6, M.top + 16, 'low beside high', q));
  body.push(text(M.left + SIZE - 6, M.top + SIZE - 8, 'high beside low', `${q} text-anchor="end"`));
  let drawingNote: string | undefined;
  if (dense) {
    const d = densitySquares(data, sx, sy);
    body.push(...d.body);
    const n = data.z.length;
    drawingNote = `With ${formatCount(n)} areas the plot shows how many areas fall in each ${BIN_PX}-pixel square (${formatCount(d.squares)} squares) instead of one dot per area; each area plotted is counted in its square.`;
    // the key: one swatch per class, under the axis label
    let x = M.left;
    const y = M.top + SIZE + 52;
    body.push(text(x, y + 11, 'Areas per square:', 'font-size="11" fill="#333333"'));
    x += 100;
    DENSITY_FROM.forEach((from, k) => {
      const to = DENSITY_FROM[k + 1];
      const words = to === undefined ? `${from} or more` : to - 1 === from ? String(from) : `${from}–${to - 1}`;
      body.push(`<rect x="${x}" y="${y}" width="14" height="14" fill="${DENSITY_FILL[k]}"/>`);
      body.push(text(x + 18, y + 11, words, 'font-size="11" fill="#333333"'));
      x += 26 + 7 * words.length;
    });
  } else {
    for (let i = 0; i < data.z.length; i++) {
      body.push(`<circle cx="${c1(sx(data.z[i]))}" cy="${c1(sy(data.lag[i]))}" r="3.5" fill="#2f6ea5" fill-opacity="0.55" stroke="#1b4470" stroke-width="0.6"/>`);
    }
  }
  // the fitted line through the origin, clipped to the plot square
  const b = data.slope;
  const xe = Math.abs(b) > 1 ? ext / Math.abs(b) : ext;
  body.push(`<path d="M${c1(sx(-xe))} ${c1(sy(-xe * b))}L${c1(sx(xe))} ${c1(sy(xe * b))}" stroke="#c0601a" stroke-width="2.2"/>`);
  body.push(text(M.left + SIZE / 2, M.top + SIZE + 40, `${valueName}, standardised`, 'font-size="13" text-anchor="middle"'));
  const yl = `neighbours' average of standardised ${valueName}`;
  body.push(`<text x="18" y="${M.top + SIZE / 2}" font-family="sans-serif" font-size="13" text-anchor="middle" transform="rotate(-90 18 ${M.top + SIZE / 2})">${escapeXml(yl)}</text>`);
  const foot = data.leftOut ? `${slopeLabel}. ${formatCount(data.leftOut)} area(s) without neighbours not shown.` : `${slopeLabel}.`;
  body.push(text(10, H - 10, foot, 'font-size="12" fill="#c0601a"'));
  const alt = `${title}: each area's standardised ${valueName} against its neighbours' average; ${foot}${drawingNote ? ` ${drawingNote}` : ''}`;
  return { svg: svgDocument(W, H, body, title), widthPx: W, heightPx: H, alt, drawingNote };
}
