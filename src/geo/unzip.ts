/** Expands a .zip of boundary files, refusing archives that would expand past the cap or mislead. */
import { InputError } from '../errors.js';
import { formatBytes } from '../core/words.js';
import type { NamedBytes } from './named-bytes.js';
import { expandEntry, listZip, looksLikeZip, checkExpandable } from './zip.js';
import { MAX_TEXT_BYTES } from './decode-text.js';

const WANTED = /\.(shp|shx|dbf|prj|cpg|geojson|json|topojson)$/i;
const TEXT = /\.(geojson|json|topojson)$/i;

function isJunk(name: string): boolean {
  const base = name.split('/').pop() ?? name;
  return name.endsWith('/') || name.startsWith('__MACOSX/') || name.includes('/__MACOSX/') || base.startsWith('._') || base === '';
}

export function isZip(file: NamedBytes): boolean {
  return /\.zip$/i.test(file.name) || looksLikeZip(file.bytes);
}

/** An .xlsx (or other Office file) rather than an archive of boundary files. */
function isWorkbookArchive(names: string[]): boolean {
  return names.includes('[Content_Types].xml') && names.some((n) => n.startsWith('xl/'));
}

export function unzipBoundary(file: NamedBytes, maxBytes: number): NamedBytes[] {
  const all = listZip(file.bytes, file.name);
  if (isWorkbookArchive(all.map((e) => e.name))) {
    throw new InputError(`${file.name} is an .xlsx workbook, not a boundary file; give it as the data table (--data) and name the boundary file separately.`, { file: file.name });
  }
  const wanted = all.filter((e) => !isJunk(e.name) && WANTED.test(e.name));
  if (wanted.length === 0) {
    throw new InputError(`${file.name} holds no boundary files (.shp/.dbf, .geojson, .json or .topojson).`, { file: file.name });
  }
  // Two entries of one name (or names differing only in letter case): which one is meant cannot be told.
  const seen = new Map<string, string>();
  for (const e of wanted) {
    const key = e.name.toLowerCase();
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      throw new InputError(
        `${file.name} holds two entries named ${earlier === e.name ? e.name : `${earlier} and ${e.name}`}; which one is meant cannot be told. ` +
          'Make the zip again with one of them.',
        { file: file.name },
      );
    }
    seen.set(key, e.name);
  }
  const declared = wanted.reduce((s, e) => s + e.size, 0);
  if (declared > maxBytes) {
    throw new InputError(
      `${file.name} would expand to ${formatBytes(declared)}, more than the ${formatBytes(maxBytes)} limit for boundary files.`,
      { file: file.name },
    );
  }
  for (const e of wanted) {
    checkExpandable(e, file.name);
    if (TEXT.test(e.name) && e.size > MAX_TEXT_BYTES) {
      throw new InputError(
        `${file.name}: ${e.name} expands to ${formatBytes(e.size)}; a GeoJSON or TopoJSON file can be read up to ${formatBytes(MAX_TEXT_BYTES)} ` +
          '(the longest text a JavaScript engine holds). Simplify the geometry, split the area, or convert it to a shapefile, which has no such limit.',
        { file: file.name },
      );
    }
  }
  return wanted.map((e) => ({ name: `${file.name}/${e.name}`, bytes: expandEntry(file.bytes, e, file.name) }));
}
