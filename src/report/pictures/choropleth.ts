import type { AreaGeometry, CoordinateKind } from '../../geo/types.js';
import { type Classes, NO_VALUE, colourOf, quantileClasses, symmetricClasses } from './classes.js';
import { fitFrame } from './projection.js';
import { label, svgDocument, text, wrapWords } from './svg.js';
import { scaleBar } from './scale-bar.js';
import { describeDrawing, drawAreas } from './area-shapes.js';

export interface ChoroplethInput {
  title: string;
  /** what the values are, for the legend heading */
  valueName: string;
  geometries: readonly AreaGeometry[];
  values: ArrayLike<number>;
  coordinates: CoordinateKind;
  /** projected coordinates: their stated length unit (the scale bar then reads in km or miles) */
  unit?: 'metre' | 'foot' | 'us-foot';
  /** diverging: centred at 0 (residuals); sequential: quantile classes (levels) */
  scale: 'diverging' | 'sequential';
}

export interface Picture {
  svg: string;
  widthPx: number;
  heightPx: number;
  /** the legend in words, for screen readers and the sheet's alt text */
  alt: string;
  /** how a map of many areas was simplified to draw it (also at the end of alt); absent when drawn plainly */
  drawingNote?: string;
}

const MAP_W = 520, MAP_H = 520, LEGEND_W = 230, TOP = 40;

function legend(c: Classes, valueName: string, x: number, y: number, hasMissing: boolean): { body: string[]; bottom: number; lines: string[] } {
  const body: string[] = [text(x, y, valueName, 'font-size="13" font-weight="bold"')];
  const lines: string[] = [];
  let yy = y + 12;
  // highest class on top, as readers expect
  for (let i = c.colours.length - 1; i >= 0; i--) {
    const lo = c.breaks[i], hi = c.breaks[i + 1];
    const s = `${label(lo)} to ${label(hi)}`;
    lines.push(s);
    body.push(`<rect x="${x}" y="${yy}" width="22" height="16" fill="${c.colours[i]}" stroke="#666666" stroke-width="0.5"/>`);
    body.push(text(x + 30, yy + 12.5, s, 'font-size="12"'));
    yy += 20;
  }
  if (hasMissing) {
    body.push(`<rect x="${x}" y="${yy}" width="22" height="16" fill="${NO_VALUE}" stroke="#666666" stroke-width="0.5"/>`);
    body.push(text(x + 30, yy + 12.5, 'no value', 'font-size="12"'));
    yy += 20;
  }
  yy += 8;
  for (const l of wrapWords(`${c.method}.`, 32)) { body.push(text(x, yy + 10, l, 'font-size="11" fill="#444444"')); yy += 14; }
  return { body, bottom: yy, lines };
}

/** A filled map of one value per area, with legend and a scale bar. */
export function choroplethSvg(input: ChoroplethInput): Picture {
  const classes = input.scale === 'diverging' ? symmetricClasses(input.values) : quantileClasses(input.values);
  const frame = fitFrame(input.geometries, input.coordinates, MAP_W, MAP_H);
  const body: string[] = [text(10, 24, input.title, 'font-size="16" font-weight="bold"')];
  let missing = false;
  for (let i = 0; i < input.values.length; i++) if (!Number.isFinite(input.values[i])) missing = true;
  const drawn = drawAreas(input.geometries, frame, TOP, (i) => colourOf(classes, input.values[i]), { stroke: '#ffffff', strokeWidth: 0.6, pointRadius: 4, pointStroke: '#555555' });
  body.push(...drawn.body);
  // outline the map area so pale classes stay visible on white
  body.push(`<rect x="0.5" y="${TOP + 0.5}" width="${frame.width - 1}" height="${frame.height - 1}" fill="none" stroke="#dddddd"/>`);

  let bottom = TOP + frame.height;
  {
    const y = bottom + 18;
    body.push(...scaleBar(frame, input.coordinates, input.unit, 12, y));
    bottom = y + 10;
  }
  const lx = Math.max(frame.width, 200) + 20;
  const leg = legend(classes, input.valueName, lx, TOP + 8, missing);
  body.push(...leg.body);
  const width = lx + LEGEND_W;
  const height = Math.ceil(Math.max(bottom, leg.bottom) + 12);
  const drawingNote = describeDrawing(drawn.drawing, input.coordinates) ?? undefined;
  const alt = `${input.title}. ${input.valueName}: ${leg.lines.join('; ')}. ${classes.method}.${drawingNote ? ` ${drawingNote}` : ''}`;
  return { svg: svgDocument(width, height, body, input.title), widthPx: width, heightPx: height, alt, drawingNote };
}

