/**
 * The one point-cloud type every reader produces and every stage consumes.
 *
 * Layout: struct of typed arrays, one entry per point, index i is the same point in every array.
 * Coordinates are Float64 in the file's own frame (offsets applied). We chose Float64 over
 * origin-relative Float32 because LAS fixtures span the whole int32 range at scale 1, where a
 * Float32 residual cannot round-trip; at 24 B/point the cost is 240 MB for 10 M points.
 * Stages that want cache-friendly local coordinates derive them with `localCoordinates`.
 */
export type AttributeArray =
  | Float64Array
  | Float32Array
  | Int32Array
  | Uint32Array
  | Int16Array
  | Uint16Array
  | Int8Array
  | Uint8Array
  | BigInt64Array
  | BigUint64Array;

/** Names of the standard per-point attributes; all optional. */
export type StandardAttribute =
  | 'intensity'
  | 'returnNumber'
  | 'numberOfReturns'
  | 'classification'
  | 'scanAngleDeg'
  | 'pointSourceId'
  | 'gpsTime'
  | 'red'
  | 'green'
  | 'blue'
  | 'nir'
  | 'userData'
  | 'scanChannel'
  | 'scanDirectionFlag'
  | 'edgeOfFlightLine'
  | 'classificationFlags';

/** A LAS variable-length record (also used for EVLRs), payload kept byte for byte. */
export interface LasVlr {
  userId: string;
  recordId: number;
  description: string;
  data: Uint8Array;
  extended: boolean;
}

/** Description of a LAS extra-bytes field as declared by the Extra Bytes VLR (LAS 1.4 §2.5.4). */
export interface ExtraBytesField {
  name: string;
  /** LAS data type code 0–30 (0 = undocumented bytes). */
  dataType: number;
  /** Byte offset of the field inside the extra-bytes block of one record. */
  byteOffset: number;
  byteSize: number;
  description: string;
  scale?: number[];
  offset?: number[];
  noData?: number[];
}

/** What the source file said about itself; kept so writers can pass CRS and VLRs through. */
export interface CloudSource {
  /** "las" | "laz" | "ply" | "ascii" | "generated" */
  format: 'las' | 'laz' | 'ply' | 'ascii' | 'generated';
  path?: string;
  lasVersion?: string;
  pointFormat?: number;
  recordLength?: number;
  scale?: [number, number, number];
  offset?: [number, number, number];
  headerBounds?: { min: [number, number, number]; max: [number, number, number] };
  headerPointCount?: number;
  globalEncoding?: number;
  systemId?: string;
  software?: string;
  creationDay?: number;
  creationYear?: number;
  fileSourceId?: number;
  vlrs?: LasVlr[];
  evlrs?: LasVlr[];
  extraBytesFields?: ExtraBytesField[];
  /** Width in bytes of the extra-bytes block per record (described or not). */
  extraBytesPerRecord?: number;
  compressed?: boolean;
  /** Problems the reader tolerated (e.g. a damaged EVLR area), one sentence each. */
  warnings?: string[];
}

export interface PointCloud {
  count: number;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Standard attributes present in the source. */
  attributes: Partial<Record<StandardAttribute, AttributeArray>>;
  /** Extra per-point fields (LAS extra bytes, PLY scalar properties, ASCII extra columns). */
  extra: Record<string, AttributeArray>;
  /** Undescribed LAS extra bytes, `extraBytesPerRecord` bytes per point, if any. */
  rawExtraBytes?: Uint8Array;
  source: CloudSource;
}

/** An empty cloud with room for nothing; handy for tests and generators. */
export function createPointCloud(
  x: Float64Array,
  y: Float64Array,
  z: Float64Array,
  source: CloudSource = { format: 'generated' },
): PointCloud {
  if (x.length !== y.length || x.length !== z.length) {
    throw new RangeError(`coordinate arrays differ in length: ${x.length}, ${y.length}, ${z.length}`);
  }
  return { count: x.length, x, y, z, attributes: {}, extra: {}, source };
}

/** Coordinates relative to `origin` as Float32, for stages that only need local geometry. */
export function localCoordinates(
  cloud: PointCloud,
  origin: [number, number, number],
): { x: Float32Array; y: Float32Array; z: Float32Array } {
  const n = cloud.count;
  const x = new Float32Array(n);
  const y = new Float32Array(n);
  const z = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = cloud.x[i] - origin[0];
    y[i] = cloud.y[i] - origin[1];
    z[i] = cloud.z[i] - origin[2];
  }
  return { x, y, z };
}
