/**
 * Boundary files kept inside the workbook as one custom XML part, so a colleague who opens the
 * workbook can re-run without the original file. Each file is deflated (fflate) and base64-encoded.
 * Our own small format: <boundaries xmlns="urn:spillway:boundary:1"><file name="…" size="…">…</file></boundaries>.
 */
import { deflateSync, inflateSync } from 'fflate';
import type { BoundaryFile } from '../shared/types.js';

export const BOUNDARY_NAMESPACE = 'urn:spillway:boundary:1';

function toBase64(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

function fromBase64(text: string): Uint8Array {
  const s = atob(text.replace(/\s+/g, ''));
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
  return out;
}

const escapeXml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const unescapeXml = (s: string) => s.replace(/&quot;/g, '"').replace(/&gt;/g, '>').replace(/&lt;/g, '<').replace(/&amp;/g, '&');

export function boundaryPartXml(files: readonly BoundaryFile[]): string {
  const body = files
    .map((f) => `<file name="${escapeXml(f.name)}" size="${f.bytes.length}">${toBase64(deflateSync(f.bytes, { level: 9 }))}</file>`)
    .join('');
  return `<?xml version="1.0" encoding="UTF-8"?><boundaries xmlns="${BOUNDARY_NAMESPACE}">${body}</boundaries>`;
}

/** The files back from the part's XML; throws when a file does not come back at its recorded size. */
export function readBoundaryPart(xml: string): BoundaryFile[] {
  const files: BoundaryFile[] = [];
  for (const m of xml.matchAll(/<file name="([^"]*)" size="(\d+)">([^<]*)<\/file>/g)) {
    const bytes = inflateSync(fromBase64(m[3]));
    if (bytes.length !== Number(m[2])) throw new Error(`The stored boundary file ${unescapeXml(m[1])} is damaged; open the original file again.`);
    files.push({ name: unescapeXml(m[1]), bytes });
  }
  return files;
}
