import type { AreaGeometry, CoordinateKind } from '../../geo/types.js';
import { NO_VALUE, colourOf, quantileClasses } from './classes.js';
import { fitFrame } from './projection.js';
import { MANY_AREAS, areaPaths, describeDrawing, drawAreas, type MapDrawing } from './area-shapes.js';
import { c1, label, svgDocument, text, wrapWords } from './svg.js';
import type { Picture } from './choropleth.js';

export interface RateMapsInput {
  /** the rate's name, for the title */
  valueName: string;
  /** its units, for the legend heading ("per 1,000") */
  units: string;
  geometries: readonly AreaGeometry[];
  coordinates: CoordinateKind;
  raw: ArrayLike<number>;
  smoothed: ArrayLike<number>;
  /** the smoothed rate in a few words ("global empirical-Bayes rate") */
  smoothedName: string;
  /** areas whose rate rests on few events: hatched on both maps */
  flagged: readonly boolean[];
  /** areas whose values the workbook withholds: grey, no value shown */
  withheld: readonly boolean[];
}

const PANEL = 400, GAP = 24, LEGEND_W = 250, TOP = 62;
const HATCH = '#222222';

/**
 * The raw rate and a smoothed rate side by side, in the same classes (quantiles of the raw rates
 * shown), so the reader sees which areas smoothing moved and how far. Areas flagged for few events
 * are hatched; withheld areas are grey with no value. The hatch is drawn over the fill, so the
 * class colour still shows through.
 */
export function rateMapsSvg(input: RateMapsInput): Picture {
  const n = input.geometries.length;
  const shown = Array.from({ length: n }, (_, i) => input.raw[i]).filter((_, i) => !input.withheld[i]);
  const classes = quantileClasses(shown);
  const frame = fitFrame(input.geometries, input.coordinates, PANEL, PANEL);
  // black and white stripes side by side, so the hatch shows on the darkest and the palest class alike
  const defs = `<defs><pattern id="flaghatch" width="7" height="7" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">` +
    `<rect width="1.6" height="7" fill="${HATCH}"/><rect x="1.6" width="1.4" height="7" fill="#ffffff"/></pattern></defs>`;
  const body: string[] = [defs, text(10, 24, `${input.valueName}: raw and smoothed`, 'font-size="16" font-weight="bold"')];
  const paths = areaPaths(input.geometries, frame);
  let drawing: MapDrawing | undefined;
  const panel = (x0: number, title: string, values: ArrayLike<number>) => {
    body.push(text(x0 + 4, TOP - 10, title, 'font-size="13" font-weight="bold"'));
    const drawn = drawAreas(input.geometries, frame, TOP, (i) => (input.withheld[i] ? NO_VALUE : colourOf(classes, values[i])), { stroke: '#ffffff', strokeWidth: 0.6, pointRadius: 4, pointStroke: '#555555' }, x0);
    body.push(...drawn.body);
    drawing = drawn.drawing;
    // the hatch over the flagged areas, drawn over the fills
    const hatched: string[] = [];
    for (let i = 0; i < n; i++) {
      if (!input.flagged[i] || input.withheld[i]) continue;
      const g = input.geometries[i];
      if (g.kind === 'point') {
        hatched.push(`<circle cx="${c1(frame.x(g.point[0], g.point[1]))}" cy="${c1(frame.y(g.point[0], g.point[1]))}" r="6.5" fill="none" stroke="${HATCH}" stroke-width="1.4"/>`);
      } else if (paths[i]) {
        hatched.push(`<path d="${paths[i]}" fill="url(#flaghatch)" stroke="${HATCH}" stroke-width="0.8"/>`);
      }
    }
    if (hatched.length) body.push(`<g transform="translate(${x0} ${TOP})" stroke-linejoin="round" fill-rule="${n > MANY_AREAS ? 'nonzero' : 'evenodd'}">`, ...hatched, '</g>');
    body.push(`<rect x="${x0 + 0.5}" y="${TOP + 0.5}" width="${frame.width - 1}" height="${frame.height - 1}" fill="none" stroke="#dddddd"/>`);
  };
  panel(0, 'Raw rate (as counted)', input.raw);
  panel(frame.width + GAP, `Smoothed: ${input.smoothedName}`, input.smoothed);

  const lx = 2 * frame.width + GAP + 20;
  let yy = TOP - 6;
  body.push(text(lx, yy + 4, `Rate ${input.units}`, 'font-size="13" font-weight="bold"'));
  yy += 14;
  const lines: string[] = [];
  for (let k = classes.colours.length - 1; k >= 0; k--) {
    const s = `${label(classes.breaks[k])} to ${label(classes.breaks[k + 1])}`;
    lines.push(s);
    body.push(`<rect x="${lx}" y="${yy}" width="22" height="16" fill="${classes.colours[k]}" stroke="#666666" stroke-width="0.5"/>`);
    body.push(text(lx + 30, yy + 12.5, s, 'font-size="12"'));
    yy += 20;
  }
  const flaggedShown = input.flagged.filter((f, i) => f && !input.withheld[i]).length;
  const withheld = input.withheld.filter(Boolean).length;
  if (flaggedShown) {
    body.push(`<rect x="${lx}" y="${yy}" width="22" height="16" fill="#ffffff" stroke="#666666" stroke-width="0.5"/>`);
    body.push(`<rect x="${lx}" y="${yy}" width="22" height="16" fill="url(#flaghatch)"/>`);
    const s = `few events: unreliable (${flaggedShown})`;
    lines.push(`hatched: ${s}`);
    body.push(text(lx + 30, yy + 12.5, s, 'font-size="12"'));
    yy += 20;
  }
  if (withheld) {
    body.push(`<rect x="${lx}" y="${yy}" width="22" height="16" fill="${NO_VALUE}" stroke="#666666" stroke-width="0.5"/>`);
    const s = `withheld for privacy (${withheld})`;
    lines.push(`grey: ${s}`);
    body.push(text(lx + 30, yy + 12.5, s, 'font-size="12"'));
    yy += 20;
  }
  yy += 8;
  const note = `The same classes in both maps: ${classes.empty ? 'no values to class' : `${classes.method.replace('areas', 'areas by their raw rate')}`}. ` +
    'An area that changes colour from left to right was moved by smoothing.';
  for (const l of wrapWords(note, 36)) { body.push(text(lx, yy + 10, l, 'font-size="11" fill="#444444"')); yy += 14; }
  const width = lx + LEGEND_W;
  const height = Math.ceil(Math.max(TOP + frame.height, yy) + 12);
  const title = `${input.valueName}: raw rate and ${input.smoothedName}, side by side`;
  const drawingNote = drawing ? describeDrawing(drawing, input.coordinates) ?? undefined : undefined;
  const alt = `${title}. Shared classes ${lines.join('; ')}.${drawingNote ? ` ${drawingNote}` : ''}`;
  return { svg: svgDocument(width, height, body, title), widthPx: width, heightPx: height, alt, drawingNote };
}
