import type { MapCategory } from './category-map.js';

/**
 * Our palette for where-the-pattern-is maps: brown for high values, green-teal for low; the two
 * clusters solid (dark brown, light teal: far apart in lightness, so they part in grey), the two kinds
 * of outlier striped in their colour (opposite slants), not significant white, no neighbours grey,
 * withheld areas (privacy) a lighter grey.
 * Checked for the common colour-vision deficiencies in test/report-local.test.ts.
 */
export const LOCAL_FILL = {
  highHigh: '#7f3b08',
  lowLow: '#7fcdbb',
  highLow: '#b35806',
  lowHigh: '#1b7a6e',
  none: '#ffffff',
  noNeighbours: '#9a9a9a',
  /** areas whose figures are withheld for privacy: a light grey, between low among low and white in lightness */
  withheld: '#dcdcdc',
} as const;

export function localMoranMapCategories(words: { hh: string; ll: string; hl: string; lh: string; ns: string; nn: string }): MapCategory[] {
  return [
    { label: words.hh, fill: { solid: LOCAL_FILL.highHigh } },
    { label: words.hl, fill: { stripes: LOCAL_FILL.highLow, angle: 45 } },
    { label: words.lh, fill: { stripes: LOCAL_FILL.lowHigh, angle: -45 } },
    { label: words.ll, fill: { solid: LOCAL_FILL.lowLow } },
    { label: words.ns, fill: { solid: LOCAL_FILL.none } },
    { label: words.nn, fill: { solid: LOCAL_FILL.noNeighbours }, optional: true },
  ];
}

/** p-value bands, darkest for the smallest p: one violet hue, ordered by lightness. */
export const P_BAND_FILL = ['#3f2a56', '#7b5f99', '#c3b2d6', '#ffffff'] as const;
