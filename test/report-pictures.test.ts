// Pictures: colour classes against CIE 1976 lightness (sRGB per IEC 61966-2-1), quantile counts by
// construction, the Moran scatter slope against Moran's I computed directly (Anselin 1996), SVG text
// escaping per XML 1.0, and PNG sizes read from the IHDR chunk (ISO/IEC 15948).
import { describe, expect, it } from 'vitest';
import { Resvg } from '@resvg/resvg-js';
import {
  choroplethSvg, moranScatterData, moranScatterSvg, symmetricClasses, quantileClasses, colourOf, DIVERGING, SEQUENTIAL, buildReport,
} from '../src/report/index.js';
import { FONT_OPTIONS, renderPng } from '../src/report/render-png.js';
import { fakeResult, GRID } from './helpers/fake-result.js';

/** CIE 1976 L* of an sRGB hex colour (IEC 61966-2-1 transfer function, D65 white). */
function lightness(hex: string): number {
  const lin = (v: number) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4);
  const [r, g, b] = [1, 3, 5].map((i) => lin(parseInt(hex.slice(i, i + 2), 16) / 255));
  const Y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  return Y > 216 / 24389 ? 116 * Math.cbrt(Y) - 16 : (24389 / 27) * Y;
}

/** Width and height from a PNG's IHDR chunk (PNG specification, ISO/IEC 15948: bytes 16–23). */
function pngSize(png: Uint8Array): [number, number] {
  expect(Array.from(png.slice(0, 8))).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  const v = new DataView(png.buffer, png.byteOffset, png.byteLength);
  return [v.getUint32(16), v.getUint32(20)];
}

describe('colour classes', () => {
  it('orders lightness so the classes read in order without relying on hue', () => {
    const Ls = SEQUENTIAL.map(lightness);
    for (let i = 1; i < Ls.length; i++) expect(Ls[i]).toBeLessThan(Ls[i - 1] - 8);
    const Ld = DIVERGING.map(lightness);
    const mid = DIVERGING.length / 2;
    for (let i = 1; i < mid; i++) expect(Ld[i]).toBeGreaterThan(Ld[i - 1] + 8);
    for (let i = mid + 1; i < Ld.length; i++) expect(Ld[i]).toBeLessThan(Ld[i - 1] - 8);
  });

  it('centres the diverging classes on zero, symmetric about it', () => {
    const c = symmetricClasses([-0.5, 2, 0.1, -3]);
    expect(c.breaks).toHaveLength(DIVERGING.length + 1);
    expect(c.breaks[0]).toBe(-3);
    expect(c.breaks.at(-1)).toBe(3);
    expect(c.breaks[DIVERGING.length / 2]).toBe(0);
    for (let i = 0; i < c.breaks.length; i++) expect(c.breaks[i]).toBeCloseTo(-c.breaks[c.breaks.length - 1 - i], 12);
    expect(colourOf(c, -0.0001)).toBe(DIVERGING[2]);
    expect(colourOf(c, 0.0001)).toBe(DIVERGING[3]);
    expect(colourOf(c, Number.NaN)).toBe('#cfcfcf');
  });

  it('puts equal numbers of distinct values in each quantile class', () => {
    const v = Array.from({ length: 25 }, (_, i) => i * 1.5);
    const c = quantileClasses(v);
    expect(c.colours).toHaveLength(5);
    const counts = new Map<string, number>();
    for (const x of v) counts.set(colourOf(c, x), (counts.get(colourOf(c, x)) ?? 0) + 1);
    // 25 distinct values in 5 quantile classes: 5 per class (closed on the right: first edge goes low)
    expect([...counts.values()].every((n) => n >= 4 && n <= 6)).toBe(true);
    expect(quantileClasses([2, 2, 2]).colours).toHaveLength(1);
  });
});

describe('Moran scatter plot', () => {
  it("has slope equal to Moran's I computed directly with row-standardised weights", () => {
    const r = fakeResult();
    const d = moranScatterData(r.y, r.weights.edges);
    // Moran's I = (n / S0) · z'Wz / z'z (Moran 1950; Cliff and Ord 1981), with a dense W here
    const n = r.n;
    const W = Array.from({ length: n }, () => new Float64Array(n));
    const e = r.weights.edges;
    for (let k = 0; k < e.from.length; k++) W[e.from[k]][e.to[k]] = e.weight[k];
    const mean = r.y.reduce((a, b) => a + b, 0) / n;
    const z = Array.from(r.y, (v) => v - mean);
    let num = 0, den = 0, s0 = 0;
    for (let i = 0; i < n; i++) { den += z[i] * z[i]; for (let j = 0; j < n; j++) { num += z[i] * W[i][j] * z[j]; s0 += W[i][j]; } }
    expect(d.slope).toBeCloseTo((n / s0) * (num / den), 12);
    expect(d.slope).toBeCloseTo(r.moranY.I, 12);
    // standardised: mean 0, population variance 1
    expect(d.z.reduce((a, b) => a + b, 0)).toBeCloseTo(0, 10);
    expect(d.z.reduce((a, b) => a + b * b, 0) / n).toBeCloseTo(1, 10);
  });

  it('rescales binary weights to averages and leaves out areas with no neighbours', () => {
    const y = [1, 2, 3, 10];
    // a path 0–1–2 with binary weights, area 3 alone
    const edges = { from: Int32Array.from([0, 1, 1, 2]), to: Int32Array.from([1, 0, 2, 1]), weight: Float64Array.from([1, 1, 1, 1]) };
    const d = moranScatterData(y, edges);
    expect(d.leftOut).toBe(1);
    expect(d.z).toHaveLength(3);
    expect(d.lag[1]).toBeCloseTo((d.z[0] + d.z[2]) / 2, 12);
    const pic = moranScatterSvg('rate', d, 'slope');
    expect(pic.svg).toContain('1 area(s) without neighbours not shown');
  });
});

describe('maps', () => {
  it('draws a scale bar in kilometres for longitude/latitude and for metres, in map units only when the unit is unknown', () => {
    // the bar's length against the map's own extent: the 5 × 5 grid spans 5000 m, or 0.05° of latitude,
    // which is 0.05 × 2π × 6371.0088 / 360 km on a sphere of the Earth's mean radius (6371.0088 km, IUGG R1; recalled from memory)
    const barAndFrame = (svg: string) => {
      const bar = /<path d="M12 [\d.]+V[\d.]+H([\d.]+)V/.exec(svg)!;
      const frame = /<rect x="0.5" y="40.5" width="([\d.]+)" height="([\d.]+)"/.exec(svg)!;
      return { length: Number(bar[1]) - 12, height: Number(frame[2]) + 1 };
    };
    const cases = [
      { kind: 'projected' as const, unit: 'metre' as const, words: /1 km</, kmTall: 5 },
      { kind: 'geographic' as const, unit: undefined, words: /1 km</, kmTall: (0.05 * 2 * Math.PI * 6371.0088) / 360 },
      { kind: 'projected' as const, unit: undefined, words: /1,000 map units \(the file does not state its unit\)/, kmTall: 5 },
    ];
    for (const c of cases) {
      const r = fakeResult({ coordinates: c.kind });
      const pic = choroplethSvg({ title: 'Residuals', valueName: 'observed − fitted', geometries: r.geometries, values: r.ols.residuals, coordinates: c.kind, unit: c.unit, scale: 'diverging' });
      expect(pic.svg).toMatch(c.words);
      if (c.unit || c.kind === 'geographic') expect(pic.svg).not.toMatch(/map units/);
      const { length, height } = barAndFrame(pic.svg);
      // 6 px of padding above and below the areas (projection.ts)
      expect(length).toBeCloseTo((height - 12) / c.kmTall, 0);
      expect((pic.svg.match(/<path d="M/g) ?? []).length).toBeGreaterThanOrEqual(GRID * GRID);
      expect(pic.alt).toMatch(/symmetric about 0/);
      // the legend's last line is one sentence, not "Classes: classes of ..."
      expect(pic.svg).not.toMatch(/Classes: classes/);
    }
  });

  it('escapes names that would break the SVG', () => {
    const r = fakeResult();
    const pic = choroplethSvg({ title: 'Rate <per> 1 000 & more', valueName: 'a"b', geometries: r.geometries, values: r.y, coordinates: 'projected', scale: 'sequential' });
    expect(pic.svg).toContain('Rate &lt;per&gt; 1 000 &amp; more');
    expect(() => new Resvg(pic.svg).render()).not.toThrow();
  });
});

describe('PNG rendering', () => {
  it('renders each overview picture at its pixel width', () => {
    const report = buildReport(fakeResult(), { renderPng });
    for (const im of report.sheets[0].images!) {
      const [w, h] = pngSize(im.png);
      expect(w).toBe(im.widthPx);
      expect(Math.abs(h - im.heightPx)).toBeLessThanOrEqual(1);
    }
  });

  it('finds a font, so labels are drawn', () => {
    const svg = (t: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40"><text x="5" y="28" font-family="sans-serif" font-size="20">${t}</text></svg>`;
    const dark = (s: string) => {
      const px = new Resvg(s, { background: '#ffffff', font: FONT_OPTIONS }).render().pixels;
      let n = 0;
      for (let i = 0; i < px.length; i += 4) if (px[i] < 128) n++;
      return n;
    };
    expect(dark(svg(''))).toBe(0);
    expect(dark(svg('Moran scatter'))).toBeGreaterThan(100);
    expect(pngSize(renderPng(svg('x'), 400))[0]).toBe(400);
  });
});
