/** Boundaries and the data table: reading, validating and joining them by ID. */
export type { NamedBytes } from './named-bytes.js';
export { readBoundary, type ReadBoundaryOptions } from './read-boundary.js';
export { readTable, type ReadTableOptions } from './read-table.js';
export { workbookSheets } from './read-xlsx.js';
export { joinAreas, JoinError, idPropertyCandidates, emptyJoinReport } from './join.js';
export { numericColumn } from './numeric-column.js';
export { decodeText, MAX_TEXT_BYTES } from './decode-text.js';
export { areaShapeWarnings, findOverlaps } from './overlaps.js';
export { subsetAreas, tableFromLayer } from './subset.js';
export { representativePoints, greatCircleKm, planarDistance, EARTH_RADIUS_KM } from './points.js';
export type * from './types.js';
export { lookAlikeKey } from './id-checks.js';
