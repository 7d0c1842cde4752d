/**
 * Cell functions that build a neighbour range (SPILL.NEIGHBOURS from coordinates, SPILL.TOUCHING
 * from the boundary file kept in the workbook). The JSDoc is read by custom-functions-metadata.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import { ExcelAdapter } from '../excel/adapter.js';
import type { ContextLike } from '../excel/api.js';
import { associate, guarded, guardedAsync } from './cell-error.js';
import { contiguityRows, neighbourRowsFromPoints } from './neighbour-logic.js';

declare const Excel: { run<T>(batch: (context: unknown) => Promise<T>): Promise<T> } | undefined;

/**
 * Neighbours from coordinate columns: spills a header and one row per link (origin ID, neighbour ID, weight), ready for the other SPILL functions. No boundary file needed. Example on the Vell Basin villages: =SPILL.NEIGHBOURS(A2:A121, C2:C121, D2:D121, "nearest", 5)
 * @customfunction NEIGHBOURS
 * @param ids The area IDs, one per row (a whole column such as A:A works: blank rows at the end are left out).
 * @param x The across coordinate of each area (easting, or longitude with "degrees"), in the same rows as the IDs.
 * @param y The up coordinate of each area (northing, or latitude with "degrees"), in the same rows.
 * @param [rule] "nearest" (the k nearest areas, the default), "within" (every area within a distance) or "inverse" (inverse-distance weights).
 * @param [size] For "nearest" how many (default 6); for "within" the distance (required); for "inverse" the power (default 1). Distances are in the coordinates' units, or km with "degrees".
 * @param [options] Words separated by commas: "degrees" (longitude/latitude, great-circle km), "binary" (every link weighs 1; by default each area's weights sum to 1), "ties" (keep every area tied at the k-th distance), "link unneighboured" (link an area with no neighbour to its nearest area), "cutoff=D" (reach of inverse distance).
 * @returns A header row, then origin ID, neighbour ID and weight per link.
 */
export function neighbours(ids: any[][], x: any[][], y: any[][], rule?: string, size?: number, options?: string): any[][] {
  return guarded(() => neighbourRowsFromPoints(ids, x, y, rule ?? undefined, size ?? undefined, options));
}

/**
 * Neighbours by shared borders, from the boundary file Spillway kept in this workbook at its last run: spills a header and one row per link (origin ID, neighbour ID, weight). Example on the Vell Basin districts: =SPILL.TOUCHING(A2:A151)
 * @customfunction TOUCHING
 * @param ids The area IDs, one per row (a whole column such as A:A works). Only these areas are linked, in this order.
 * @param [rule] "queen" (a shared border or corner, the default) or "rook" (a shared stretch of border).
 * @param [options] Words separated by commas: "binary" (every link weighs 1; by default each area's weights sum to 1), "order=2" (areas exactly two steps away: neighbours of neighbours that are not neighbours themselves; any order up to 10), "cumulative" (with order=K, every area up to K steps away, e.g. "order=2, cumulative"), "link unneighboured" (link an area with no neighbour to its nearest area).
 * @param [idProperty] The boundary file's property holding the IDs; by default the one the sidebar used, else the only property that holds them all.
 * @returns A header row, then origin ID, neighbour ID and weight per link.
 */
export async function touching(ids: any[][], rule?: string, options?: string, idProperty?: string): Promise<any[][]> {
  return guardedAsync(async () => {
    if (typeof Excel === 'undefined') return contiguityRows(null, ids);
    const excel = new ExcelAdapter((batch) => Excel!.run((context) => batch(context as ContextLike)));
    const files = await excel.loadBoundary();
    // the ID property of the sidebar's last run, when the kept file names the IDs otherwise
    const setup = await excel.loadSetup().catch(() => null);
    const remembered = setup?.areas?.kind === 'file' ? setup.areas.idProperty ?? setup.id : setup?.id;
    return contiguityRows(files, ids, rule ?? undefined, idProperty ?? undefined, options, remembered);
  });
}

export function registerNeighbourFunctions(): void {
  associate('NEIGHBOURS', neighbours);
  associate('TOUCHING', touching);
}
