// Maps and plots of many areas: the simplified drawing keeps every area on the picture, checked on
// the pixels resvg (a general-purpose SVG renderer) draws, and says what was simplified; the
// Ramer–Douglas–Peucker rule (Douglas and Peucker 1973) drops points that lie on a straight edge.
import { describe, expect, it } from 'vitest';
import { Resvg } from '@resvg/resvg-js';
import type { AreaGeometry } from '../src/geo/types.js';
import { buildReport, choroplethSvg, moranScatterSvg } from '../src/report/index.js';
import { MANY_AREAS, POINT_BUDGET, SIMPLIFY_PX, describeDrawing, drawAreas } from '../src/report/pictures/area-shapes.js';
import { MANY_POINTS } from '../src/report/pictures/moran-scatter.js';
import { fitFrame } from '../src/report/pictures/projection.js';
import { fakeResult } from './helpers/fake-result.js';

/** A side × side grid of square cells of 100 units, each edge carrying `extra` points on the straight line. */
function grid(side: number, extra = 0): AreaGeometry[] {
  const out: AreaGeometry[] = [];
  for (let r = 0; r < side; r++) for (let c = 0; c < side; c++) {
    const x0 = 300000 + 100 * c, y0 = 5000000 + 100 * r;
    const corners = [[x0, y0], [x0 + 100, y0], [x0 + 100, y0 + 100], [x0, y0 + 100]];
    const ring: number[][] = [];
    for (let k = 0; k < 4; k++) {
      const [ax, ay] = corners[k], [bx, by] = corners[(k + 1) % 4];
      for (let j = 0; j <= extra; j++) ring.push([ax + ((bx - ax) * j) / (extra + 1), ay + ((by - ay) * j) / (extra + 1)]);
    }
    ring.push(ring[0]);
    out.push({ kind: 'polygon', polygons: [[ring]] });
  }
  return out;
}

/** A distinct colour per area, so that each area can be found among the drawn pixels. */
const colour = (i: number) => `#${(i * 97 + 0x102030).toString(16).padStart(6, '0').slice(-6)}`;

/** The exact colours resvg drew (anti-aliased edge pixels blend; the inside of each cell stays exact). */
function drawnColours(svg: string): Set<string> {
  const img = new Resvg(svg, { background: '#ffffff' }).render();
  const px = img.pixels;
  const seen = new Set<string>();
  for (let p = 0; p < px.length; p += 4) seen.add(`#${[px[p], px[p + 1], px[p + 2]].map((v) => v.toString(16).padStart(2, '0')).join('')}`);
  return seen;
}

function mapSvg(geoms: AreaGeometry[], fill: (i: number) => string): { svg: string; drawing: ReturnType<typeof drawAreas>['drawing'] } {
  const frame = fitFrame(geoms, 'projected', 520, 520);
  const { body, drawing } = drawAreas(geoms, frame, 0, fill, { stroke: '#ffffff', strokeWidth: 0.6, pointRadius: 4, pointStroke: '#555555' });
  return { svg: `<svg xmlns="http://www.w3.org/2000/svg" width="${frame.width}" height="${frame.height}">${body.join('')}</svg>`, drawing };
}

describe('maps of many areas', () => {
  it('draws every one of more than 20,000 areas, simplified, with no outline, one path per colour', () => {
    const side = Math.ceil(Math.sqrt(MANY_AREAS + 1));
    // three extra points on each edge: 16 points per ring, 13 of them on straight lines
    const geoms = grid(side, 3);
    const { svg, drawing } = mapSvg(geoms, colour);
    expect(drawing.outlines).toBe(false);
    expect(drawing.simplified).not.toBeNull();
    expect(drawing.simplified!.pointsBefore).toBe(geoms.length * 16);
    expect(drawing.simplified!.pointsBefore).toBeGreaterThan(POINT_BUDGET);
    // the straight-line points go; the four corners of each cell stay
    expect(drawing.simplified!.pointsAfter).toBe(geoms.length * 4);
    expect(drawing.simplified!.tolerancePx).toBe(SIMPLIFY_PX);
    expect(svg).not.toContain('stroke-width');
    const seen = drawnColours(svg);
    const missing = geoms.map((_, i) => i).filter((i) => !seen.has(colour(i)));
    expect(missing).toEqual([]);
  });

  it('says so when simplifying removed nothing (squares have no point to spare)', () => {
    const geoms = grid(Math.ceil(Math.sqrt(POINT_BUDGET / 4 + 1)));
    const { drawing } = mapSvg(geoms, colour);
    expect(drawing.simplified!.pointsAfter).toBe(drawing.simplified!.pointsBefore);
    expect(describeDrawing(drawing, 'projected')).toMatch(/boundaries drawn as they are: simplifying them to within 0\.5 pixel \(about [\d.]+ map units\) would remove none of their [\d,]+ points/);
  });

  it('groups areas of one colour in one path without losing any', () => {
    const geoms = grid(Math.ceil(Math.sqrt(MANY_AREAS + 1)));
    const fills = ['#1b4470', '#7eaad0', '#eef3f8'];
    const { svg } = mapSvg(geoms, (i) => fills[i % 3]);
    expect((svg.match(/<path /g) ?? []).length).toBe(3);
    // one closed ring per area across the three paths
    expect((svg.match(/Z/g) ?? []).length).toBe(geoms.length);
  });

  it('draws an area too small to show as a one-pixel square, with and without outlines', () => {
    // a county-sized area beside a speck a millionth of its width
    const big: AreaGeometry = { kind: 'polygon', polygons: [[[[0, 0], [100000, 0], [100000, 100000], [0, 100000], [0, 0]]]] };
    const speck: AreaGeometry = { kind: 'polygon', polygons: [[[[150000, 50000], [150000.1, 50000], [150000.1, 50000.1], [150000, 50000.1], [150000, 50000]]]] };
    const { svg, drawing } = mapSvg([big, speck], (i) => (i === 0 ? '#1b4470' : '#a4500f'));
    expect(drawing.enlarged).toBe(1);
    expect(drawing.outlines).toBe(true);
    expect(svg).toMatch(/h1v1h-1Z" fill="#a4500f" stroke="none"/);
    expect(drawnColours(svg).has('#a4500f')).toBe(true);
    const pic = choroplethSvg({ title: 't', valueName: 'v', geometries: [big, speck], values: [1, 2], coordinates: 'projected', scale: 'sequential' });
    expect(pic.drawingNote).toMatch(/1 area too small to show drawn as one-pixel squares/);
    expect(pic.alt).toContain(pic.drawingNote!);
  });

  it('leaves a plain map of few areas as it was: outlined, one path per area, no note', () => {
    const geoms = grid(10);
    const { svg, drawing } = mapSvg(geoms, colour);
    expect(drawing).toEqual({ areas: 100, outlines: true, simplified: null, enlarged: 0 });
    expect((svg.match(/<path /g) ?? []).length).toBe(100);
    expect(choroplethSvg({ title: 't', valueName: 'v', geometries: geoms, values: geoms.map((_, i) => i), coordinates: 'projected', scale: 'sequential' }).drawingNote).toBeUndefined();
  });
});

describe('Moran scatter plot of many areas', () => {
  it('counts every area in the density squares and says so', () => {
    const n = MANY_POINTS + 5000;
    const z = Float64Array.from({ length: n }, (_, i) => Math.sin(i) * 2);
    const lag = Float64Array.from(z, (v, i) => 0.4 * v + 0.3 * Math.cos(i * 7));
    const pic = moranScatterSvg('rate', { z, lag, slope: 0.4, leftOut: 0, areas: Int32Array.from({ length: n }, (_, i) => i) }, 'slope');
    expect(pic.drawingNote).toMatch(/25,000 areas .* each area plotted is counted in its square/);
    expect(pic.svg).not.toContain('<circle');
    // the squares' classes add up: at least one square, at most one per area
    const squares = (pic.svg.match(/h2v2h-2Z/g) ?? []).length;
    expect(squares).toBeGreaterThan(0);
    expect(squares).toBeLessThanOrEqual(n);
  });
});

describe('the note in the workbook', () => {
  it('puts how the maps were simplified on the Summary, in the picture captions and on the record sheet', () => {
    const r = fakeResult();
    // each of the 25 areas as a circle of 5,000 points: 125,000 points, over the budget
    r.geometries = r.geometries.map((g) => {
      if (g.kind !== 'polygon') return g;
      const ring = g.polygons[0][0];
      const cx = (ring[0][0] + ring[2][0]) / 2, cy = (ring[0][1] + ring[2][1]) / 2, rad = Math.abs(ring[2][0] - ring[0][0]) / 2;
      const circle = Array.from({ length: 5000 }, (_, k) => [cx + rad * Math.cos((2 * Math.PI * k) / 5000), cy + rad * Math.sin((2 * Math.PI * k) / 5000)]);
      circle.push(circle[0]);
      return { kind: 'polygon', polygons: [[circle]] } as AreaGeometry;
    });
    const report = buildReport(r);
    const summary = report.sheets[0];
    const note = summary.blocks.find((b) => b.kind === 'paragraph' && b.text.startsWith('Pictures below.'));
    expect(note && note.kind === 'paragraph' && note.text).toMatch(/boundaries simplified to within 0.5 pixel .* boundary points drawn of 125,000/);
    const maps = summary.images!.filter((im) => im.name.startsWith('map'));
    expect(maps).toHaveLength(2);
    for (const im of maps) expect(im.alt).toContain(im.drawingNote!);
    const record = report.sheets.find((s) => s.role === 'record')!;
    const kv = record.blocks.find((b) => b.kind === 'keyValues' && b.title.startsWith('Pictures drawn other than plainly'));
    expect(kv && kv.kind === 'keyValues' && kv.rows.map((x) => x[0])).toEqual(['Summary: map of the outcome', 'Summary: map of residuals']);
    // the pictures sit below the note
    expect(summary.images![0].anchor.row).toBeGreaterThan(summary.blocks.length);
  });
});
