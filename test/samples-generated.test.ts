/**
 * The committed sample data in sample-workbooks/: reproducible from the generator, geometrically
 * sound, and consistent with the process its truth files state. Checks rest on the shoelace
 * formula, the GeoJSON rules of RFC 7946, the definitions of queen contiguity and k nearest
 * neighbours, and the algebra of the stated processes — recomputed here from the files alone.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import { unzipSync, strFromU8 } from 'fflate';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

type Pt = [number, number];
const root = resolve(fileURLToPath(import.meta.url), '..', '..');
const committed = join(root, 'sample-workbooks');
let fresh = '';

beforeAll(() => {
  fresh = mkdtempSync(join(tmpdir(), 'spillway-samples-'));
  execFileSync(process.execPath, ['--import', 'tsx', 'scripts/generate-samples.ts', fresh], { cwd: root, stdio: 'pipe' });
});
afterAll(() => {
  if (fresh) rmSync(fresh, { recursive: true, force: true });
});

const readJson = (folder: string, name: string): any => JSON.parse(readFileSync(join(folder, name), 'utf8'));

async function readBook(path: string): Promise<ExcelJS.Workbook> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.readFile(path);
  return wb;
}

/** Every non-empty cell as [sheet, address, value, number format], in order. */
async function cellDump(path: string): Promise<unknown[][]> {
  const out: unknown[][] = [];
  (await readBook(path)).eachSheet((ws) =>
    ws.eachRow((row) => row.eachCell((cell) => out.push([ws.name, cell.address, cell.value, cell.numFmt ?? null]))),
  );
  return out;
}

/** Sheet rows as objects keyed by the header row. */
async function sheetRecords(path: string, sheet: string): Promise<{ header: string[]; rows: Record<string, unknown>[] }> {
  const ws = (await readBook(path)).getWorksheet(sheet);
  if (!ws) throw new Error(`no sheet ${sheet} in ${path}`);
  const header = (ws.getRow(1).values as unknown[]).slice(1).map(String);
  const rows: Record<string, unknown>[] = [];
  ws.eachRow((row, n) => {
    if (n === 1) return;
    rows.push(Object.fromEntries(header.map((h, k) => [h, row.getCell(k + 1).value])));
  });
  return { header, rows };
}

/** Shoelace formula (Gauss's area formula), about the first vertex; positive when counter-clockwise. */
function shoelace(ring: Pt[]): number {
  const [ox, oy] = ring[0];
  let s = 0;
  for (let i = 0; i + 1 < ring.length; i++) {
    s += (ring[i][0] - ox) * (ring[i + 1][1] - oy) - (ring[i + 1][0] - ox) * (ring[i][1] - oy);
  }
  return s / 2;
}

const orient = (a: Pt, b: Pt, c: Pt): number => Math.sign((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]));
/** Proper or touching intersection of two segments (orientation test, exact on these small integers/decimals). */
function segmentsMeet(a: Pt, b: Pt, c: Pt, d: Pt): boolean {
  const o1 = orient(a, b, c);
  const o2 = orient(a, b, d);
  const o3 = orient(c, d, a);
  const o4 = orient(c, d, b);
  if (o1 !== o2 && o3 !== o4) return true;
  const onSeg = (p: Pt, q: Pt, r: Pt) =>
    Math.min(p[0], r[0]) <= q[0] && q[0] <= Math.max(p[0], r[0]) && Math.min(p[1], r[1]) <= q[1] && q[1] <= Math.max(p[1], r[1]);
  return (o1 === 0 && onSeg(a, c, b)) || (o2 === 0 && onSeg(a, d, b)) || (o3 === 0 && onSeg(c, a, d)) || (o4 === 0 && onSeg(c, b, d));
}

const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length;
const sampleSd = (v: number[]) => {
  const m = mean(v);
  return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
};
const lagOf = (nb: number[][], v: number[]) => nb.map((n) => n.reduce((s, j) => s + v[j], 0) / n.length);

describe('sample data regenerate exactly', () => {
  it('writes the same six files', () => {
    expect(readdirSync(fresh).sort()).toEqual(
      ['vell-basin-districts.geojson', 'vell-basin-truth.json', 'vell-basin-villages-truth.json', 'vell-basin-villages.geojson', 'vell-basin-villages.xlsx', 'vell-basin.xlsx'],
    );
  });

  it.each(['vell-basin-districts.geojson', 'vell-basin-villages.geojson', 'vell-basin-truth.json', 'vell-basin-villages-truth.json'])(
    '%s is byte-identical',
    (name) => {
      expect(readFileSync(join(fresh, name)).equals(readFileSync(join(committed, name)))).toBe(true);
    },
  );

  it.each(['vell-basin.xlsx', 'vell-basin-villages.xlsx'])('%s has identical cell values and formats', async (name) => {
    expect(await cellDump(join(fresh, name))).toEqual(await cellDump(join(committed, name)));
  });

  it.each(['vell-basin.xlsx', 'vell-basin-villages.xlsx'])('%s holds no formulas', async (name) => {
    // In SpreadsheetML a formula is an <f> element inside a cell (ECMA-376 Part 1, §18.3.1.40).
    const files = unzipSync(readFileSync(join(committed, name)));
    const sheets = Object.keys(files).filter((k) => k.startsWith('xl/worksheets/') && k.endsWith('.xml'));
    expect(sheets.length).toBe(2);
    for (const k of sheets) expect(strFromU8(files[k])).not.toMatch(/<f[\s>]/);
    (await readBook(join(committed, name))).eachSheet((ws) =>
      ws.eachRow((row) => row.eachCell((cell) => expect(cell.type).not.toBe(ExcelJS.ValueType.Formula))),
    );
  });
});

describe('district boundaries', () => {
  const gj = readJson(committed, 'vell-basin-districts.geojson');
  const truth = readJson(committed, 'vell-basin-truth.json');
  const rings: Pt[][] = gj.features.map((f: any) => f.geometry.coordinates[0]);

  it('is a FeatureCollection of ~150 single-ring polygons with IDs and names', () => {
    expect(gj.type).toBe('FeatureCollection');
    expect(gj['spillway:coordinates']).toBe('projected metres, invented local grid');
    expect(gj.features.length).toBe(truth.n);
    expect(truth.n).toBeGreaterThanOrEqual(140);
    expect(truth.n).toBeLessThanOrEqual(160);
    const ids = gj.features.map((f: any) => f.properties.district_id);
    expect(new Set(ids).size).toBe(ids.length);
    ids.forEach((id: string, i: number) => expect(id).toBe(`VB-${String(i + 1).padStart(3, '0')}`));
    for (const f of gj.features) {
      expect(f.geometry.type).toBe('Polygon');
      expect(f.geometry.coordinates.length).toBe(1);
      expect(typeof f.properties.district_name).toBe('string');
    }
  });

  it('every ring is closed, valid, counter-clockwise and non-degenerate', () => {
    for (const ring of rings) {
      // RFC 7946 §3.1.6: a linear ring has at least four positions, first equals last; exterior rings counter-clockwise.
      expect(ring.length).toBeGreaterThanOrEqual(4);
      expect(ring[ring.length - 1]).toEqual(ring[0]);
      for (const [x, y] of ring) {
        expect(x).toBeGreaterThan(400000);
        expect(x).toBeLessThan(520000);
        expect(y).toBeGreaterThan(5000000);
        expect(y).toBeLessThan(5110000);
        expect(Math.round(x * 100) / 100).toBe(x);
        expect(Math.round(y * 100) / 100).toBe(y);
      }
      const m = ring.length - 1;
      for (let i = 0; i < m; i++) expect(ring[i]).not.toEqual(ring[i + 1]);
      expect(new Set(ring.slice(0, m).map((p) => p.join())).size).toBe(m);
      expect(shoelace(ring)).toBeGreaterThan(1e6); // every district over 1 km²
      for (let i = 0; i < m; i++) {
        for (let j = i + 2; j < m; j++) {
          if (i === 0 && j === m - 1) continue; // neighbouring edges through the closing vertex
          expect(segmentsMeet(ring[i], ring[i + 1], ring[j], ring[j + 1])).toBe(false);
        }
      }
    }
  });

  it('tiles the outline: areas add up, shared edges match, the free edges form one ring', () => {
    const total = rings.reduce((s, r) => s + shoelace(r), 0);
    expect(Math.abs(total - truth.outline_area_m2) / truth.outline_area_m2).toBeLessThan(1e-6);
    // Each interior edge appears once in each direction (no overlap, consistent orientation);
    // edges used once are the outer boundary, which must chain into a single closed ring.
    const directed = new Map<string, number>();
    for (const r of rings) for (let i = 0; i + 1 < r.length; i++) directed.set(`${r[i]}|${r[i + 1]}`, (directed.get(`${r[i]}|${r[i + 1]}`) ?? 0) + 1);
    const next = new Map<string, string>();
    for (const [key, count] of directed) {
      expect(count).toBe(1);
      const [a, b] = key.split('|');
      if (!directed.has(`${b}|${a}`)) {
        expect(next.has(a)).toBe(false);
        next.set(a, b);
      }
    }
    const start = next.keys().next().value as string;
    const outer: Pt[] = [];
    let at = start;
    do {
      outer.push(at.split(',').map(Number) as Pt);
      at = next.get(at) as string;
      expect(at).toBeDefined();
    } while (at !== start && outer.length <= next.size);
    outer.push(outer[0]);
    expect(outer.length - 1).toBe(next.size);
    expect(Math.abs(shoelace(outer) - total) / total).toBeLessThan(1e-6);
  });
});

describe('district attributes follow the stated spatial lag process', () => {
  const gj = readJson(committed, 'vell-basin-districts.geojson');
  const truth = readJson(committed, 'vell-basin-truth.json');
  let header: string[] = [];
  let rows: Record<string, unknown>[] = [];
  beforeAll(async () => ({ header, rows } = await sheetRecords(join(committed, 'vell-basin.xlsx'), 'Districts')));

  it('has the documented columns, one row per district, numbers as numbers', () => {
    expect(header).toEqual(['district_id', 'district_name', 'long_commute_pct', 'broadband_pct', 'rail_km', 'rent_index', 'population', 'clinic_wait_days', 'residents_70plus', 'fall_admissions']);
    expect(rows.length).toBe(truth.n);
    rows.forEach((r, i) => {
      expect(r.district_id).toBe(gj.features[i].properties.district_id);
      expect(r.district_name).toBe(gj.features[i].properties.district_name);
      for (const k of header.slice(2)) expect(typeof r[k]).toBe('number');
      expect(r.long_commute_pct as number).toBeGreaterThan(0);
      expect(r.long_commute_pct as number).toBeLessThan(100);
      expect(r.broadband_pct as number).toBeLessThanOrEqual(100);
    });
  });

  it('(I − ρW)y − Xβ looks like the stated noise (loose sanity check)', () => {
    // Queen contiguity by definition: two districts are neighbours when they share a boundary vertex.
    const owners = new Map<string, number[]>();
    gj.features.forEach((f: any, i: number) => {
      for (const p of f.geometry.coordinates[0]) owners.set(p.join(), [...new Set([...(owners.get(p.join()) ?? []), i])]);
    });
    const nb: number[][] = rows.map(() => []);
    for (const set of owners.values()) for (const i of set) for (const j of set) if (i !== j && !nb[i].includes(j)) nb[i].push(j);
    expect(nb.every((n) => n.length > 0)).toBe(true);
    const y = rows.map((r) => r.long_commute_pct as number);
    const Wy = lagOf(nb, y);
    const { beta, rho, sigma } = truth;
    const e = rows.map(
      (r, i) => y[i] - rho * Wy[i] - (beta.intercept + beta.broadband_pct * (r.broadband_pct as number) + beta.rail_km * (r.rail_km as number) + beta.rent_index * (r.rent_index as number)),
    );
    // Loose checks only: mean within three standard errors (common practice), spread within ±25% of σ.
    expect(Math.abs(mean(e))).toBeLessThan((3 * sigma) / Math.sqrt(e.length));
    expect(sampleSd(e)).toBeGreaterThan(0.75 * sigma);
    expect(sampleSd(e)).toBeLessThan(1.25 * sigma);
    // The recovered noise matches the realised draw the generator recorded (outcome rounding is 0.01).
    expect(Math.abs(sampleSd(e) - truth.realised_errors.sd)).toBeLessThan(0.01);
  });

  it('the rates example: whole counts within their populations, a few very small districts, counts around the stated rate', () => {
    const ex = truth.rates_example;
    const small = new Set(ex.small_districts);
    expect(small.size).toBe(8);
    let expected = 0, observed = 0;
    rows.forEach((r, i) => {
      const d = r.fall_admissions as number, n = r.residents_70plus as number;
      expect(Number.isInteger(d) && Number.isInteger(n)).toBe(true);
      expect(d).toBeGreaterThanOrEqual(0);
      expect(d).toBeLessThanOrEqual(n);
      expect(n).toBeLessThanOrEqual(r.population as number);
      if (small.has(r.district_id)) { expect(n).toBeGreaterThanOrEqual(30); expect(n).toBeLessThanOrEqual(150); } else expect(n).toBeGreaterThan(150);
      expected += (n * ex.underlying_rate_per_1000[i]) / 1000;
      observed += d;
    });
    // Poisson counts: the total lies within 3 standard errors (√expected) of its expectation (common practice)
    expect(Math.abs(observed - expected)).toBeLessThan(3 * Math.sqrt(expected));
  });

  it('the About sheet says the data are invented and states the parameters', async () => {
    const ws = (await readBook(join(committed, 'vell-basin.xlsx'))).getWorksheet('About this data');
    const lines: unknown[][] = [];
    ws?.eachRow((row) => lines.push((row.values as unknown[]).slice(1)));
    expect(lines.some((l) => l.join(' ').includes('made up'))).toBe(true);
    const value = (label: string) => lines.find((l) => l[0] === label)?.[1];
    expect(value('rho (ρ)')).toBe(truth.rho);
    expect(value('sigma (σ)')).toBe(truth.sigma);
    expect(String(value('seed'))).toContain(String(truth.seed));
    for (const [k, b] of Object.entries(truth.beta)) expect(value(`beta: ${k}`)).toBe(b);
  });
});

describe('villages follow the stated spatial error process', () => {
  const gj = readJson(committed, 'vell-basin-villages.geojson');
  const truth = readJson(committed, 'vell-basin-villages-truth.json');
  let header: string[] = [];
  let rows: Record<string, unknown>[] = [];
  beforeAll(async () => ({ header, rows } = await sheetRecords(join(committed, 'vell-basin-villages.xlsx'), 'Villages')));

  it('sheet and GeoJSON points agree', () => {
    expect(header).toEqual(['village_id', 'village_name', 'x_m', 'y_m', 'new_business_per_1000', 'broadband_pct', 'town_km', 'residents']);
    expect(rows.length).toBe(truth.n);
    expect(gj.features.length).toBe(truth.n);
    rows.forEach((r, i) => {
      const f = gj.features[i];
      expect(f.geometry.type).toBe('Point');
      expect(f.properties.village_id).toBe(r.village_id);
      expect(f.geometry.coordinates).toEqual([r.x_m, r.y_m]);
    });
  });

  it('(I − λW)(y − Xβ) looks like the stated noise on 5-nearest-neighbour weights (loose sanity check)', () => {
    const pts = rows.map((r) => [r.x_m as number, r.y_m as number]);
    const k = 5;
    const nb = pts.map((p, i) => {
      const d = pts.map((q, j) => ({ j, d: (p[0] - q[0]) ** 2 + (p[1] - q[1]) ** 2 })).filter((o) => o.j !== i).sort((a, b) => a.d - b.d);
      expect(d[k - 1].d).toBeLessThan(d[k].d); // no tie at the k-th place: the neighbour set is unambiguous
      return d.slice(0, k).map((o) => o.j);
    });
    const { beta, lambda, sigma } = truth;
    const u = rows.map(
      (r) => (r.new_business_per_1000 as number) - (beta.intercept + beta.broadband_pct * (r.broadband_pct as number) + beta.town_km * (r.town_km as number)),
    );
    const Wu = lagOf(nb, u);
    const e = u.map((v, i) => v - lambda * Wu[i]);
    expect(Math.abs(mean(e))).toBeLessThan((3 * sigma) / Math.sqrt(e.length));
    expect(sampleSd(e)).toBeGreaterThan(0.75 * sigma);
    expect(sampleSd(e)).toBeLessThan(1.25 * sigma);
    expect(Math.abs(sampleSd(e) - truth.realised_errors.sd)).toBeLessThan(0.01);
  });
});
