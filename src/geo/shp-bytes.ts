/**
 * Checks on the .shp main file before the `shapefile` package reads it: the shape type (the package
 * would read lines, which areas cannot be) and the record count, which the package does not compare
 * with the .dbf (it pairs records until the .shp ends, leaving attributes undefined or dropped).
 */
import { InputError } from '../errors.js';

export type ShapeFamily = 'polygon' | 'point' | 'multipoint' | 'null';

const FAMILIES: Record<number, ShapeFamily> = {
  0: 'null', 1: 'point', 11: 'point', 21: 'point', 8: 'multipoint', 18: 'multipoint', 28: 'multipoint',
  5: 'polygon', 15: 'polygon', 25: 'polygon',
};
const LINES = new Set([3, 13, 23]);

export interface ShpLayout {
  shapeType: number;
  family: ShapeFamily;
  recordCount: number;
}

export function readShpLayout(bytes: Uint8Array, file: string): ShpLayout {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.length < 100 || view.getInt32(0, false) !== 9994) {
    throw new InputError(`${file} is not a shapefile main file (.shp): its header is missing or damaged.`, { file });
  }
  const shapeType = view.getInt32(32, true);
  if (LINES.has(shapeType)) {
    throw new InputError(
      `${file} holds lines (shape type ${shapeType}); only polygons and points are supported as areas.`,
      { file },
    );
  }
  const family = FAMILIES[shapeType];
  if (!family) {
    throw new InputError(`${file} has shape type ${shapeType}, which is not supported; use polygons or points.`, { file });
  }
  let recordCount = 0;
  let at = 100;
  while (at + 8 <= bytes.length) {
    const contentBytes = view.getInt32(at + 4, false) * 2;
    if (contentBytes < 4 || at + 8 + contentBytes > bytes.length) {
      throw new InputError(
        `${file} is damaged or truncated at record ${recordCount + 1} (byte ${at}); export the layer again.`,
        { file, feature: recordCount + 1 },
      );
    }
    at += 8 + contentBytes;
    recordCount++;
  }
  return { shapeType, family, recordCount };
}
