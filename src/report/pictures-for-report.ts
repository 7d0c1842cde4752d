import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, PngRenderer, ReportImage, ReportSheet } from './types.js';
import { choroplethSvg, moranScatterData, moranScatterSvg, type Picture, type ScatterData } from './pictures/index.js';
import { ROW_HEIGHT_PX } from './layout.js';
import { say } from './format.js';
import { withheldOutcome } from './withheld.js';

/**
 * The Moran scatter plot's points of the outcome, without the areas whose outcome is withheld for
 * privacy (their position would give the value back); the slope is the statistic of all areas.
 */
export function scatterPoints(result: AnalysisResult): ScatterData & { withheld: number } {
  const d = moranScatterData(result.y, result.weights.edges);
  const hide = withheldOutcome(result);
  if (!hide) return { ...d, withheld: 0 };
  const keep = Array.from(d.areas.keys()).filter((k) => !hide[d.areas[k]]);
  return {
    z: Float64Array.from(keep, (k) => d.z[k]), lag: Float64Array.from(keep, (k) => d.lag[k]), slope: d.slope, leftOut: d.leftOut,
    areas: Int32Array.from(keep, (k) => d.areas[k]), withheld: d.z.length - keep.length,
  };
}

/** The overview's pictures as SVG (maps of the outcome and of the plain regression's residuals, the Moran scatter plot), before they are placed on the sheet. */
export function overviewPictureList(result: AnalysisResult): { name: string; pic: Picture }[] {
  const y = result.request.y;
  const pictures: { name: string; pic: Picture }[] = [];
  const hide = withheldOutcome(result);
  const shown = (v: Float64Array) => (hide ? v.map((x, i) => (hide[i] ? NaN : x)) : v);
  if (result.geometries.length === result.n) {
    pictures.push({
      name: 'map of the outcome',
      pic: choroplethSvg({ title: `${y} by area`, valueName: y, geometries: result.geometries, values: shown(result.y), coordinates: result.coordinates, unit: result.coordinateUnit, scale: 'sequential' }),
    });
    pictures.push({
      name: 'map of residuals',
      pic: choroplethSvg({
        title: 'Residuals of the plain regression', valueName: 'observed − fitted',
        geometries: result.geometries, values: shown(result.ols.residuals), coordinates: result.coordinates, unit: result.coordinateUnit, scale: 'diverging',
      }),
    });
  }
  const data = scatterPoints(result);
  const slopeLabel = (result.weights.transform === 'row'
    ? `Slope of the line = Moran's I = ${say(data.slope)}`
    : `Slope of the line ${say(data.slope)} (Moran's I with the weights row-standardised; with the weights used it is ${say(result.moranY.I)})`) +
    (data.withheld ? `; ${data.withheld} withheld area(s) not shown, though counted in the slope` : '');
  pictures.push({ name: 'Moran scatter plot', pic: moranScatterSvg(y, data, slopeLabel) });
  return pictures;
}

/** Each distinct way the pictures were simplified, once (the two maps of one run are drawn alike). */
function distinctNotes(notes: (string | undefined)[]): string[] {
  return [...new Set(notes.filter((n): n is string => !!n))];
}

/** A note above the pictures saying how they were drawn where not plainly (simplified, cut away from ±180°); null when all were. */
export function drawingNoteBlock(pictures: readonly { pic: Picture }[]): Block | null {
  const notes = distinctNotes(pictures.map((p) => p.pic.drawingNote));
  return notes.length ? { kind: 'paragraph', style: 'note', text: `Pictures below. ${notes.join(' ')}` } : null;
}

/** For the record sheet: how each picture not drawn plainly was drawn (simplified, or cut away from ±180°). */
export function drawingRecordBlocks(sheets: readonly ReportSheet[]): Block[] {
  const rows: [string, string, 'text'][] = [];
  for (const sheet of sheets) for (const im of sheet.images ?? []) if (im.drawingNote) rows.push([`${sheet.name}: ${im.name}`, im.drawingNote, 'text']);
  return rows.length ? [{ kind: 'keyValues', title: 'Pictures drawn other than plainly', rows }] : [];
}

/** Pictures stacked in column A from `firstRow` down, two rows apart; rendered to PNG when a renderer is given. */
export function placePictures(pictures: { name: string; pic: Picture }[], firstRow: number, renderPng?: PngRenderer): ReportImage[] {
  let row = firstRow;
  return pictures.map(({ name, pic }) => {
    const image: ReportImage = {
      name, svg: pic.svg, widthPx: pic.widthPx, heightPx: pic.heightPx, alt: pic.alt, drawingNote: pic.drawingNote,
      png: renderPng ? renderPng(pic.svg, pic.widthPx) : new Uint8Array(0),
      anchor: { row, col: 1 },
    };
    row += Math.ceil(pic.heightPx / ROW_HEIGHT_PX) + 2;
    return image;
  });
}
