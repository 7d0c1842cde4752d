/** Expands a .zip of boundary files with fflate, refusing archives that would expand past the cap. */
import { unzipSync } from 'fflate';
import { InputError } from '../errors.js';
import type { NamedBytes } from './named-bytes.js';

const WANTED = /\.(shp|shx|dbf|prj|cpg|geojson|json|topojson)$/i;

function isJunk(name: string): boolean {
  const base = name.split('/').pop() ?? name;
  return name.endsWith('/') || name.startsWith('__MACOSX/') || name.includes('/__MACOSX/') || base.startsWith('._') || base === '';
}

export function formatBytes(n: number): string {
  if (n >= 2 ** 30) return `${+(n / 2 ** 30).toFixed(2)} GiB`;
  if (n >= 2 ** 20) return `${+(n / 2 ** 20).toFixed(2)} MiB`;
  if (n >= 2 ** 10) return `${+(n / 2 ** 10).toFixed(2)} KiB`;
  return `${n} bytes`;
}

export function isZip(file: NamedBytes): boolean {
  const b = file.bytes;
  return /\.zip$/i.test(file.name) || (b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && b[2] === 0x03 && b[3] === 0x04);
}

export function unzipBoundary(file: NamedBytes, maxBytes: number): NamedBytes[] {
  let declared = 0;
  const names: string[] = [];
  try {
    // First pass reads the central directory only: sizes are checked before anything is inflated.
    unzipSync(file.bytes, {
      filter: (info) => {
        if (!isJunk(info.name) && WANTED.test(info.name)) {
          declared += info.originalSize;
          names.push(info.name);
        }
        return false;
      },
    });
  } catch (e) {
    throw new InputError(`${file.name} could not be opened as a .zip archive (${e instanceof Error ? e.message : String(e)}).`, { file: file.name });
  }
  if (declared > maxBytes) {
    throw new InputError(
      `${file.name} would expand to ${formatBytes(declared)}, more than the ${formatBytes(maxBytes)} limit for boundary files.`,
      { file: file.name },
    );
  }
  if (names.length === 0) {
    throw new InputError(`${file.name} holds no boundary files (.shp/.dbf, .geojson, .json or .topojson).`, { file: file.name });
  }
  let entries: Record<string, Uint8Array>;
  try {
    entries = unzipSync(file.bytes, { filter: (info) => names.includes(info.name) });
  } catch (e) {
    throw new InputError(`${file.name} is damaged: ${e instanceof Error ? e.message : String(e)}.`, { file: file.name });
  }
  return Object.entries(entries).map(([name, bytes]) => ({ name: `${file.name}/${name}`, bytes }));
}
