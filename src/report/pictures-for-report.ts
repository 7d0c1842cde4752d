import type { AnalysisResult } from '../pipeline/types.js';
import type { PngRenderer, ReportImage } from './types.js';
import { choroplethSvg, moranScatterData, moranScatterSvg, type Picture } from './pictures/index.js';
import { ROW_HEIGHT_PX } from './layout.js';
import { say } from './format.js';

/** The overview's pictures: maps of the outcome and of the plain regression's residuals, and the Moran scatter plot. */
export function overviewPictures(result: AnalysisResult, firstRow: number, renderPng?: PngRenderer): ReportImage[] {
  const y = result.request.y;
  const pictures: { name: string; pic: Picture }[] = [];
  if (result.geometries.length === result.n) {
    pictures.push({
      name: 'map of the outcome',
      pic: choroplethSvg({ title: `${y} by area`, valueName: y, geometries: result.geometries, values: result.y, coordinates: result.coordinates, unit: result.coordinateUnit, scale: 'sequential' }),
    });
    pictures.push({
      name: 'map of residuals',
      pic: choroplethSvg({
        title: 'Residuals of the plain regression', valueName: 'observed − fitted',
        geometries: result.geometries, values: result.ols.residuals, coordinates: result.coordinates, unit: result.coordinateUnit, scale: 'diverging',
      }),
    });
  }
  const data = moranScatterData(result.y, result.weights.edges);
  const slopeLabel = result.weights.transform === 'row'
    ? `Slope of the line = Moran's I = ${say(data.slope)}`
    : `Slope of the line ${say(data.slope)} (Moran's I with the weights row-standardised; with the weights used it is ${say(result.moranY.I)})`;
  pictures.push({ name: 'Moran scatter plot', pic: moranScatterSvg(y, data, slopeLabel) });

  return placePictures(pictures, firstRow, renderPng);
}

/** Pictures stacked in column A from `firstRow` down, two rows apart; rendered to PNG when a renderer is given. */
export function placePictures(pictures: { name: string; pic: Picture }[], firstRow: number, renderPng?: PngRenderer): ReportImage[] {
  let row = firstRow;
  return pictures.map(({ name, pic }) => {
    const image: ReportImage = {
      name, svg: pic.svg, widthPx: pic.widthPx, heightPx: pic.heightPx, alt: pic.alt,
      png: renderPng ? renderPng(pic.svg, pic.widthPx) : new Uint8Array(0),
      anchor: { row, col: 1 },
    };
    row += Math.ceil(pic.heightPx / ROW_HEIGHT_PX) + 2;
    return image;
  });
}
