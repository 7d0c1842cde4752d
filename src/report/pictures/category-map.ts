import type { AreaGeometry, CoordinateKind } from '../../geo/types.js';
import { fitFrame } from './projection.js';
import { describeDrawing, drawAreas } from './area-shapes.js';
import { svgDocument, text, wrapWords } from './svg.js';
import { scaleBar } from './scale-bar.js';
import type { Picture } from './choropleth.js';

/** One class of a category map: its legend words and how it is filled. */
export interface MapCategory {
  label: string;
  /** a solid colour, or stripes of `colour` on white at the given angle */
  fill: { solid: string } | { stripes: string; angle: 45 | -45 };
  /** left out of the legend when no area falls in it */
  optional?: boolean;
}

export interface CategoryMapInput {
  title: string;
  legendTitle: string;
  geometries: readonly AreaGeometry[];
  /** index into `categories` per area */
  category: ArrayLike<number>;
  categories: MapCategory[];
  coordinates: CoordinateKind;
  /** projected coordinates: their stated length unit, for the scale bar */
  unit?: 'metre' | 'foot' | 'us-foot';
  /** a line under the legend (how the categories were decided) */
  note?: string;
}

const MAP_W = 520, MAP_H = 520, LEGEND_W = 250, TOP = 40;

/**
 * A map of categories (not of numbers). Fills are solid colours ordered by lightness, and stripes for
 * the in-between categories, so the map still reads when printed in grey or seen with a
 * colour-vision deficiency. Areas get a grey outline so white (not significant) areas stay visible.
 */
export function categoryMapSvg(input: CategoryMapInput): Picture {
  const frame = fitFrame(input.geometries, input.coordinates, MAP_W, MAP_H);
  const defs: string[] = [];
  const paint = input.categories.map((c, k) => {
    if ('solid' in c.fill) return c.fill.solid;
    const id = `stripes${k}`;
    defs.push(`<pattern id="${id}" width="7" height="7" patternUnits="userSpaceOnUse" patternTransform="rotate(${c.fill.angle})">` +
      `<rect width="7" height="7" fill="#ffffff"/><rect width="3.5" height="7" fill="${c.fill.stripes}"/></pattern>`);
    return `url(#${id})`;
  });
  const body: string[] = [`<defs>${defs.join('')}</defs>`, text(10, 24, input.title, 'font-size="16" font-weight="bold"')];
  const counts = new Array(input.categories.length).fill(0);
  for (let i = 0; i < input.geometries.length; i++) counts[input.category[i]]++;
  const drawn = drawAreas(input.geometries, frame, TOP, (i) => paint[input.category[i]], { stroke: '#8a8a8a', strokeWidth: 0.5, pointRadius: 4.5, pointStroke: '#444444' });
  body.push(...drawn.body);
  body.push(`<rect x="0.5" y="${TOP + 0.5}" width="${frame.width - 1}" height="${frame.height - 1}" fill="none" stroke="#dddddd"/>`);
  body.push(...scaleBar(frame, input.coordinates, input.unit, 12, TOP + frame.height + 18));
  const lx = Math.max(frame.width, 200) + 20;
  let yy = TOP + 8;
  body.push(text(lx, yy, input.legendTitle, 'font-size="13" font-weight="bold"'));
  yy += 12;
  const lines: string[] = [];
  input.categories.forEach((c, k) => {
    if (c.optional && counts[k] === 0) return;
    body.push(`<rect x="${lx}" y="${yy}" width="22" height="16" fill="${paint[k]}" stroke="#666666" stroke-width="0.5"/>`);
    const words = `${c.label} (${counts[k]})`;
    lines.push(words);
    body.push(text(lx + 30, yy + 12.5, words, 'font-size="12"'));
    yy += 20;
  });
  if (input.note) {
    yy += 8;
    for (const l of wrapWords(input.note, 36)) { body.push(text(lx, yy + 10, l, 'font-size="11" fill="#444444"')); yy += 14; }
  }
  const width = lx + LEGEND_W;
  const height = Math.ceil(Math.max(TOP + frame.height + 28, yy) + 12);
  const drawingNote = describeDrawing(drawn.drawing, input.coordinates) ?? undefined;
  const alt = `${input.title}. ${input.legendTitle}: ${lines.join('; ')}.${drawingNote ? ` ${drawingNote}` : ''}`;
  return { svg: svgDocument(width, height, body, input.title), widthPx: width, heightPx: height, alt, drawingNote };
}
