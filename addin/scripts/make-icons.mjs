// Draws the add-in's icons (16, 32, 64, 80 px) and writes them as PNG with node:zlib, so no image
// tool is needed. The picture: water stepping down over three ledges, on a deep blue tile.
// Run: node addin/scripts/make-icons.mjs   (writes addin/public/assets/icon-<size>.png)
import { deflateSync } from 'node:zlib';
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const OUT = join(dirname(fileURLToPath(import.meta.url)), '..', 'public', 'assets');
const TILE = [27, 68, 112];
const LEDGE = [255, 255, 255];
const WATER = [120, 190, 235];

/** Colour at a point of the unit square (0..1, y down), or null for transparent. */
function paint(x, y) {
  const r = 0.18; // rounded corners
  const cx = Math.min(Math.max(x, r), 1 - r), cy = Math.min(Math.max(y, r), 1 - r);
  if ((x - cx) ** 2 + (y - cy) ** 2 > r * r) return null;
  // three ledges, each lower and further right
  for (let k = 0; k < 3; k++) {
    const top = 0.3 + k * 0.2, left = 0.14 + k * 0.22;
    if (y >= top && y <= top + 0.07 && x >= left && x <= left + 0.3) return LEDGE;
    // the water falling off each ledge's right end
    const fx = left + 0.3, wave = 0.03 * Math.sin((y - top) * 28);
    if (y > top + 0.07 && y < top + 0.2 && x > fx - 0.02 + wave && x < fx + 0.06 + wave) return WATER;
  }
  return TILE;
}

function crc32(buf) {
  let c, crc = 0xffffffff;
  for (let n = 0; n < buf.length; n++) {
    c = (crc ^ buf[n]) & 0xff;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    crc = (crc >>> 8) ^ c;
  }
  return (crc ^ 0xffffffff) >>> 0;
}

function chunk(type, data) {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}

function png(size) {
  const S = 4; // samples per pixel side, for smooth edges
  const raw = Buffer.alloc(size * (size * 4 + 1));
  for (let py = 0; py < size; py++) {
    raw[py * (size * 4 + 1)] = 0; // filter: none
    for (let px = 0; px < size; px++) {
      let r = 0, g = 0, b = 0, a = 0;
      for (let sy = 0; sy < S; sy++) {
        for (let sx = 0; sx < S; sx++) {
          const c = paint((px + (sx + 0.5) / S) / size, (py + (sy + 0.5) / S) / size);
          if (c) { r += c[0]; g += c[1]; b += c[2]; a++; }
        }
      }
      const o = py * (size * 4 + 1) + 1 + px * 4;
      raw[o] = a ? Math.round(r / a) : 0;
      raw[o + 1] = a ? Math.round(g / a) : 0;
      raw[o + 2] = a ? Math.round(b / a) : 0;
      raw[o + 3] = Math.round((255 * a) / (S * S));
    }
  }
  const header = Buffer.alloc(13);
  header.writeUInt32BE(size, 0);
  header.writeUInt32BE(size, 4);
  header[8] = 8; // bit depth
  header[9] = 6; // RGBA
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

mkdirSync(OUT, { recursive: true });
for (const size of [16, 32, 64, 80]) writeFileSync(join(OUT, `icon-${size}.png`), png(size));
console.log(`icons written to ${OUT}`);
