/**
 * What the input checks of issue #17 cost:
 * - a zip whose entry claims 1,000 bytes but inflates to 1 GiB (about 1 MiB compressed, made with
 *   Node's zlib): the time to refuse it, and for comparison the time fflate's whole-archive inflate
 *   takes on the same bytes (what reading it cost before entries were inflated in steps);
 * - the overlap, duplicate and coincidence checks on the 300×300 grid GeoJSON (90,000 squares),
 *   beside the time to read the file, and on the us-atlas counties.
 */
import { createDeflateRaw } from 'node:zlib';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { unzipSync } from 'fflate';
import { readBoundary, findOverlaps, representativePoints } from '../src/geo/index.js';
import { InputError } from '../src/errors.js';
import { gridGeoJson } from './grid-geojson.js';

const seconds = (t0: number) => +((performance.now() - t0) / 1000).toFixed(4);

async function deflateSpaces(total: number): Promise<Uint8Array> {
  const chunks: Buffer[] = [];
  const z = createDeflateRaw({ level: 1 });
  z.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise((resolve) => z.on('end', resolve));
  const block = Buffer.alloc(64 * 2 ** 20, 0x20);
  for (let written = 0; written < total; written += block.length) {
    if (!z.write(block)) await new Promise((resolve) => z.once('drain', resolve));
  }
  z.end();
  await done;
  return new Uint8Array(Buffer.concat(chunks));
}

/** One stored-as-deflate entry in a zip (APPNOTE 6.3: local header, data, central header, end record), claiming `claimed` bytes. */
function zipOne(name: string, data: Uint8Array, claimed: number): Uint8Array {
  const nameBytes = new TextEncoder().encode(name);
  const local = new Uint8Array(30 + nameBytes.length);
  const lv = new DataView(local.buffer);
  lv.setUint32(0, 0x04034b50, true); lv.setUint16(4, 20, true); lv.setUint16(8, 8, true);
  lv.setUint32(18, data.length, true); lv.setUint32(22, claimed, true); lv.setUint16(26, nameBytes.length, true);
  local.set(nameBytes, 30);
  const central = new Uint8Array(46 + nameBytes.length);
  const cv = new DataView(central.buffer);
  cv.setUint32(0, 0x02014b50, true); cv.setUint16(4, 20, true); cv.setUint16(6, 20, true); cv.setUint16(10, 8, true);
  cv.setUint32(20, data.length, true); cv.setUint32(24, claimed, true); cv.setUint16(28, nameBytes.length, true);
  central.set(nameBytes, 46);
  const end = new Uint8Array(22);
  const ev = new DataView(end.buffer);
  ev.setUint32(0, 0x06054b50, true); ev.setUint16(8, 1, true); ev.setUint16(10, 1, true);
  ev.setUint32(12, central.length, true); ev.setUint32(16, local.length + data.length, true);
  const out = new Uint8Array(local.length + data.length + central.length + end.length);
  out.set(local); out.set(data, local.length); out.set(central, local.length + data.length); out.set(end, local.length + data.length + central.length);
  return out;
}

export async function understatedZipWorkload(): Promise<Record<string, unknown>> {
  const expands = 2 ** 30;
  const zip = zipOne('districts.geojson', await deflateSpaces(expands), 1000);
  let a = performance.now();
  let message = '';
  try {
    await readBoundary([{ name: 'districts.zip', bytes: zip }]);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    message = e.message;
  }
  const refuseSeconds = seconds(a);
  a = performance.now();
  let inflated = 0;
  try {
    inflated = Object.values(unzipSync(zip)).reduce((s, b) => s + b.length, 0);
  } catch {
    inflated = -1;
  }
  return {
    workload: 'zip entry claiming 1,000 bytes that inflates to 1 GiB',
    zipMiB: +(zip.length / 2 ** 20).toFixed(2),
    refuseSeconds,
    refused: message.slice(0, 120),
    wholeArchiveInflateSeconds: seconds(a),
    wholeArchiveInflatedMiB: Math.round(inflated / 2 ** 20),
  };
}

export async function overlapChecksWorkload(): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = { workload: 'overlap, duplicate and coincidence checks' };
  const grid = new TextEncoder().encode(gridGeoJson(300, 300));
  let a = performance.now();
  const layer = await readBoundary([{ name: 'grid300.geojson', bytes: grid }]);
  out.grid300ReadSeconds = seconds(a);
  const g = layer.areas.map((x) => x.geometry!);
  const pts = representativePoints(g);
  a = performance.now();
  const found = findOverlaps(g, pts);
  out.grid300CheckSeconds = seconds(a);
  out.grid300Findings = found.duplicates.length + found.overlaps.length + found.coincident.length;
  const counties = new Uint8Array(readFileSync(createRequire(import.meta.url).resolve('us-atlas/counties-10m.json')));
  a = performance.now();
  const c = await readBoundary([{ name: 'counties-10m.json', bytes: counties }], { layer: 'counties' });
  out.countiesReadSeconds = seconds(a);
  const cg = c.areas.map((x) => x.geometry!).filter(Boolean);
  a = performance.now();
  findOverlaps(cg, representativePoints(cg));
  out.countiesCheckSeconds = seconds(a);
  return out;
}
