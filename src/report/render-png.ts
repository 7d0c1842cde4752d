/**
 * SVG → PNG in Node, with resvg (a native module: not for the browser, which draws the SVG itself).
 * Kept apart from the picture builders and handed to buildReport as opts.renderPng.
 */
import { Resvg } from '@resvg/resvg-js';

/** The pictures ask for the generic sans-serif family; system fonts supply it (DejaVu Sans where present). */
export const FONT_OPTIONS = { loadSystemFonts: true, sansSerifFamily: 'DejaVu Sans' };

export function renderPng(svg: string, widthPx: number): Uint8Array {
  const r = new Resvg(svg, {
    fitTo: { mode: 'width', value: Math.max(1, Math.round(widthPx)) },
    background: '#ffffff',
    font: FONT_OPTIONS,
  });
  return new Uint8Array(r.render().asPng());
}
