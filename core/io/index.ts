/** Public I/O API: readers, writers and the inspect summary. */
export { readCloud, readPlyMesh, sniffFormat, type ReadOptions } from './read-cloud.js';
export { encodeLas, writeLas, lasOptionsLike, defaultOffset, DEFAULT_LAS_SCALE, type LasWriteOptions } from './las-write.js';
export { encodePlyPoints, encodePlyMesh, type TriangleMesh } from './ply.js';
export { inspectCloud, formatInspectTable, type InspectReport } from './inspect.js';
