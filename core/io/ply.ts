import { readSync } from 'node:fs';
import type { AttributeArray, PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { readLines } from './line-reader.js';

/**
 * PLY polygon files (Turk 1994, "The PLY Polygon File Format"): an ASCII header of `element` and
 * `property` lines, then the body in ascii, binary_little_endian or binary_big_endian.
 * Reading: vertex x, y, z (any numeric type) to Float64; every other scalar vertex property
 * into `cloud.extra` with its own type. Other elements (faces …) are skipped.
 */
export type PlyFormat = 'ascii' | 'binary_little_endian' | 'binary_big_endian';

type PlyScalar = 'int8' | 'uint8' | 'int16' | 'uint16' | 'int32' | 'uint32' | 'float32' | 'float64';

const TYPE_ALIASES: Record<string, PlyScalar> = {
  char: 'int8', int8: 'int8', uchar: 'uint8', uint8: 'uint8',
  short: 'int16', int16: 'int16', ushort: 'uint16', uint16: 'uint16',
  int: 'int32', int32: 'int32', uint: 'uint32', uint32: 'uint32',
  float: 'float32', float32: 'float32', double: 'float64', float64: 'float64',
};
const TYPE_SIZE: Record<PlyScalar, number> = { int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4, float32: 4, float64: 8 };

interface PlyProperty {
  name: string;
  type: PlyScalar;
  /** For list properties: the count type. */
  countType?: PlyScalar;
}
interface PlyElement {
  name: string;
  count: number;
  properties: PlyProperty[];
}
export interface PlyHeader {
  format: PlyFormat;
  elements: PlyElement[];
  /** Byte where the body starts. */
  bodyStart: number;
}

/** Parse the header from the first bytes of the file. */
export function parsePlyHeader(bytes: Uint8Array, file: string): PlyHeader {
  const bad = (problem: string) => new XylemapError(problem, { file, hint: 'the PLY header is damaged; re-export the file' });
  const text = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('latin1');
  const endMatch = /end_header\r?\n/.exec(text);
  if (!text.startsWith('ply')) throw bad('not a PLY file (magic "ply" missing)');
  if (!endMatch) throw bad('PLY header has no "end_header" line (truncated file?)');
  const lines = text.slice(0, endMatch.index).split(/\r?\n/);
  let format: PlyFormat | undefined;
  const elements: PlyElement[] = [];
  for (const raw of lines.slice(1)) {
    const t = raw.trim().split(/\s+/);
    if (t[0] === 'format') {
      if (t[1] !== 'ascii' && t[1] !== 'binary_little_endian' && t[1] !== 'binary_big_endian') throw bad(`unknown PLY format "${t[1]}"`);
      format = t[1];
    } else if (t[0] === 'element') {
      const count = Number(t[2]);
      if (!(Number.isInteger(count) && count >= 0)) throw bad(`element "${t[1]}" has an invalid count "${t[2]}"`);
      elements.push({ name: t[1], count, properties: [] });
    } else if (t[0] === 'property') {
      const el = elements[elements.length - 1];
      if (!el) throw bad('a property line comes before any element line');
      if (t[1] === 'list') {
        const countType = TYPE_ALIASES[t[2]];
        const type = TYPE_ALIASES[t[3]];
        if (!countType || !type) throw bad(`unknown PLY list types "${t[2]} ${t[3]}"`);
        el.properties.push({ name: t[4], type, countType });
      } else {
        const type = TYPE_ALIASES[t[1]];
        if (!type) throw bad(`unknown PLY property type "${t[1]}"`);
        el.properties.push({ name: t[2], type });
      }
    }
  }
  if (!format) throw bad('PLY header has no "format" line');
  return { format, elements, bodyStart: Buffer.byteLength(text.slice(0, endMatch.index + endMatch[0].length), 'latin1') };
}

function allocate(type: PlyScalar, n: number): AttributeArray {
  switch (type) {
    case 'int8': return new Int8Array(n);
    case 'uint8': return new Uint8Array(n);
    case 'int16': return new Int16Array(n);
    case 'uint16': return new Uint16Array(n);
    case 'int32': return new Int32Array(n);
    case 'uint32': return new Uint32Array(n);
    case 'float32': return new Float32Array(n);
    default: return new Float64Array(n);
  }
}

function readValue(v: DataView, p: number, type: PlyScalar, le: boolean): number {
  switch (type) {
    case 'int8': return v.getInt8(p);
    case 'uint8': return v.getUint8(p);
    case 'int16': return v.getInt16(p, le);
    case 'uint16': return v.getUint16(p, le);
    case 'int32': return v.getInt32(p, le);
    case 'uint32': return v.getUint32(p, le);
    case 'float32': return v.getFloat32(p, le);
    default: return v.getFloat64(p, le);
  }
}

/** Sequential reader over a file in 1 MB chunks; `need(k)` guarantees k bytes at `pos`. */
class ChunkReader {
  buf = new Uint8Array(1 << 20);
  view = new DataView(this.buf.buffer);
  pos = 0;
  len = 0;
  constructor(private fd: number, private filePos: number, private file: string) {}
  need(k: number): void {
    if (this.len - this.pos >= k) return;
    if (k > this.buf.length) {
      const bigger = new Uint8Array(Math.max(k, this.buf.length * 2));
      bigger.set(this.buf.subarray(this.pos, this.len));
      this.buf = bigger;
      this.view = new DataView(bigger.buffer);
    } else this.buf.copyWithin(0, this.pos, this.len);
    this.len -= this.pos;
    this.pos = 0;
    while (this.len < k) {
      const n = readSync(this.fd, this.buf, this.len, this.buf.length - this.len, this.filePos);
      if (n === 0) throw new XylemapError('PLY file ends before all elements were read (truncated file?)', { file: this.file, hint: 'copy or export the file again' });
      this.filePos += n;
      this.len += n;
    }
  }
}

/**
 * Read a PLY point cloud from an open descriptor (streaming: the body is read in chunks).
 * @throws XylemapError for a damaged header, missing x/y/z, truncated body or non-finite coordinates.
 */
export function readPlyFd(fd: number, file: string): PointCloud {
  const head = new Uint8Array(65536);
  const got = readSync(fd, head, 0, head.length, 0);
  const header = parsePlyHeader(head.subarray(0, got), file);
  const vertex = header.elements.find((e) => e.name === 'vertex');
  if (!vertex) throw new XylemapError('PLY file has no "vertex" element', { file, hint: 'export the points as PLY vertices' });
  const names = vertex.properties.map((p) => p.name);
  for (const axis of ['x', 'y', 'z']) {
    const p = vertex.properties.find((q) => q.name === axis);
    if (!p || p.countType) throw new XylemapError(`PLY vertex element has no scalar "${axis}" property (has: ${names.join(', ')})`, { file, hint: 'export x, y and z as vertex properties' });
  }
  const n = vertex.count;
  const columns: AttributeArray[] = vertex.properties.map((p) => (p.name === 'x' || p.name === 'y' || p.name === 'z' ? new Float64Array(n) : p.countType ? new Float64Array(0) : allocate(p.type, n)));
  if (header.format === 'ascii') readAsciiBody(fd, header, vertex, columns, file);
  else readBinaryBody(fd, header, vertex, columns, file);
  const at = (name: string) => columns[names.indexOf(name)] as Float64Array;
  const cloud: PointCloud = { count: n, x: at('x'), y: at('y'), z: at('z'), attributes: {}, extra: {}, source: { format: 'ply', path: file } };
  vertex.properties.forEach((p, k) => {
    if (p.name !== 'x' && p.name !== 'y' && p.name !== 'z' && !p.countType) cloud.extra[p.name] = columns[k];
  });
  for (const axis of [cloud.x, cloud.y, cloud.z]) {
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(axis[i])) {
        throw new XylemapError(`vertex ${i} has a non-finite coordinate (${axis[i]})`, { file, hint: 'remove NaN/Inf vertices before reading' });
      }
    }
  }
  return cloud;
}

function readBinaryBody(fd: number, header: PlyHeader, vertex: PlyElement, columns: AttributeArray[], file: string): void {
  const le = header.format === 'binary_little_endian';
  const r = new ChunkReader(fd, header.bodyStart, file);
  for (const el of header.elements) {
    const isVertex = el === vertex;
    const fixed = el.properties.every((p) => !p.countType);
    const recordSize = fixed ? el.properties.reduce((s, p) => s + TYPE_SIZE[p.type], 0) : 0;
    for (let i = 0; i < el.count; i++) {
      if (fixed) r.need(recordSize);
      for (let k = 0; k < el.properties.length; k++) {
        const p = el.properties[k];
        if (p.countType) {
          r.need(TYPE_SIZE[p.countType]);
          const m = readValue(r.view, r.pos, p.countType, le);
          r.pos += TYPE_SIZE[p.countType];
          r.need(m * TYPE_SIZE[p.type]);
          r.pos += m * TYPE_SIZE[p.type];
          continue;
        }
        if (!fixed) r.need(TYPE_SIZE[p.type]);
        if (isVertex) (columns[k] as Float64Array)[i] = readValue(r.view, r.pos, p.type, le);
        r.pos += TYPE_SIZE[p.type];
      }
    }
    if (isVertex) return;
  }
}

function readAsciiBody(fd: number, header: PlyHeader, vertex: PlyElement, columns: AttributeArray[], file: string): void {
  const lines = readLines(fd, header.bodyStart);
  let lineNo = 0;
  for (const el of header.elements) {
    const isVertex = el === vertex;
    for (let i = 0; i < el.count; i++) {
      let next = lines.next();
      lineNo++;
      while (!next.done && next.value.trim() === '') {
        next = lines.next();
        lineNo++;
      }
      if (next.done) throw new XylemapError(`PLY body ends after ${lineNo - 1} lines, before all ${el.name} elements were read`, { file, hint: 'copy or export the file again' });
      if (!isVertex) continue;
      const t = next.value.trim().split(/\s+/);
      let at = 0;
      for (let k = 0; k < el.properties.length; k++) {
        const p = el.properties[k];
        if (p.countType) {
          at += 1 + Number(t[at]);
          continue;
        }
        const v = Number(t[at++]);
        if (t[at - 1] === undefined || Number.isNaN(v)) {
          throw new XylemapError(`PLY body line ${lineNo}: vertex ${i} property "${p.name}" is "${t[at - 1]}", not a number`, { file, hint: 'fix the line or re-export the file' });
        }
        (columns[k] as Float64Array)[i] = v;
      }
    }
    if (isVertex) return;
  }
}

// ---------------------------------------------------------------------------------------------
// Writers

/** A triangle mesh: positions xyz per vertex, optional rgb per vertex, three vertex indices per face. */
export interface TriangleMesh {
  positions: Float64Array;
  colors?: Uint8Array;
  faces: Uint32Array;
}

interface OutProperty {
  name: string;
  type: PlyScalar;
  values: ArrayLike<number>;
}

function plyTypeOf(a: AttributeArray): PlyScalar {
  if (a instanceof Int8Array) return 'int8';
  if (a instanceof Uint8Array) return 'uint8';
  if (a instanceof Int16Array) return 'int16';
  if (a instanceof Uint16Array) return 'uint16';
  if (a instanceof Int32Array) return 'int32';
  if (a instanceof Uint32Array) return 'uint32';
  if (a instanceof Float32Array) return 'float32';
  return 'float64';
}

const PLY_TYPE_NAME: Record<PlyScalar, string> = {
  int8: 'char', uint8: 'uchar', int16: 'short', uint16: 'ushort', int32: 'int', uint32: 'uint', float32: 'float', float64: 'double',
};

function writeValue(v: DataView, p: number, type: PlyScalar, value: number): void {
  switch (type) {
    case 'int8': v.setInt8(p, value); break;
    case 'uint8': v.setUint8(p, value); break;
    case 'int16': v.setInt16(p, value, true); break;
    case 'uint16': v.setUint16(p, value, true); break;
    case 'int32': v.setInt32(p, value, true); break;
    case 'uint32': v.setUint32(p, value, true); break;
    case 'float32': v.setFloat32(p, value, true); break;
    default: v.setFloat64(p, value, true);
  }
}

/** Shortest text that parses back to the same value (JS number → string is round-trip exact). */
function asciiValue(type: PlyScalar, value: number): string {
  return type === 'float32' ? String(Math.fround(value)) : String(value);
}

function encodePly(
  format: 'binary_little_endian' | 'ascii',
  vertexCount: number,
  vertexProps: OutProperty[],
  faces: Uint32Array | undefined,
  comment: string,
): Uint8Array {
  const head: string[] = ['ply', `format ${format} 1.0`, `comment ${comment}`, `element vertex ${vertexCount}`];
  for (const p of vertexProps) head.push(`property ${PLY_TYPE_NAME[p.type]} ${p.name}`);
  const faceCount = faces ? faces.length / 3 : 0;
  if (faces) head.push(`element face ${faceCount}`, 'property list uchar uint vertex_indices');
  head.push('end_header', '');
  const headBytes = Buffer.from(head.join('\n'), 'latin1');
  if (format === 'ascii') {
    const lines: string[] = [];
    for (let i = 0; i < vertexCount; i++) lines.push(vertexProps.map((p) => asciiValue(p.type, p.values[i])).join(' '));
    for (let f = 0; f < faceCount; f++) lines.push(`3 ${faces![3 * f]} ${faces![3 * f + 1]} ${faces![3 * f + 2]}`);
    const body = Buffer.from(lines.length ? lines.join('\n') + '\n' : '', 'latin1');
    const out = new Uint8Array(headBytes.length + body.length);
    out.set(headBytes);
    out.set(body, headBytes.length);
    return out;
  }
  const recordSize = vertexProps.reduce((s, p) => s + TYPE_SIZE[p.type], 0);
  const total = headBytes.length + vertexCount * recordSize + faceCount * 13;
  const out = new Uint8Array(total);
  out.set(headBytes);
  const view = new DataView(out.buffer);
  let at = headBytes.length;
  for (const p of vertexProps) {
    const size = TYPE_SIZE[p.type];
    for (let i = 0, q = at; i < vertexCount; i++, q += recordSize) writeValue(view, q, p.type, p.values[i]);
    at += size;
  }
  at = headBytes.length + vertexCount * recordSize;
  for (let f = 0; f < faceCount; f++, at += 13) {
    view.setUint8(at, 3);
    view.setUint32(at + 1, faces![3 * f], true);
    view.setUint32(at + 5, faces![3 * f + 1], true);
    view.setUint32(at + 9, faces![3 * f + 2], true);
  }
  return out;
}

/**
 * Encode a cloud as PLY vertices: x, y, z as double (exact), then every `cloud.extra` column with
 * its own type (BigInt columns are written as double).
 */
export function encodePlyPoints(cloud: PointCloud, format: 'binary_little_endian' | 'ascii' = 'binary_little_endian'): Uint8Array {
  const props: OutProperty[] = [
    { name: 'x', type: 'float64', values: cloud.x },
    { name: 'y', type: 'float64', values: cloud.y },
    { name: 'z', type: 'float64', values: cloud.z },
  ];
  for (const [name, values] of Object.entries(cloud.extra)) {
    if (/\s/.test(name) || name === 'x' || name === 'y' || name === 'z') continue;
    if (values instanceof BigInt64Array || values instanceof BigUint64Array) {
      props.push({ name, type: 'float64', values: Float64Array.from(values, Number) });
    } else props.push({ name, type: plyTypeOf(values), values });
  }
  return encodePly(format, cloud.count, props, undefined, 'written by xylemap');
}

/**
 * Encode a triangle mesh as PLY: vertex x, y, z (double), optional red/green/blue (uchar),
 * faces as `vertex_indices` lists (uchar count, uint indices).
 * @throws XylemapError when positions/colours/faces have inconsistent lengths or indices are out of range.
 */
export function encodePlyMesh(mesh: TriangleMesh, format: 'binary_little_endian' | 'ascii' = 'binary_little_endian'): Uint8Array {
  const n = mesh.positions.length / 3;
  const fail = (problem: string) => new XylemapError(problem, { stage: 'io', hint: 'this is a bug in the mesh builder; please report it' });
  if (!Number.isInteger(n)) throw fail(`mesh positions length ${mesh.positions.length} is not a multiple of 3`);
  if (mesh.faces.length % 3 !== 0) throw fail(`mesh faces length ${mesh.faces.length} is not a multiple of 3`);
  if (mesh.colors && mesh.colors.length !== 3 * n) throw fail(`mesh has ${mesh.colors.length / 3} colours for ${n} vertices`);
  for (let i = 0; i < mesh.faces.length; i++) if (!(mesh.faces[i] < n)) throw fail(`face index ${mesh.faces[i]} is out of range (0..${n - 1})`);
  const component = (src: ArrayLike<number>, k: number) => {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = src[3 * i + k];
    return out;
  };
  const props: OutProperty[] = [
    { name: 'x', type: 'float64', values: component(mesh.positions, 0) },
    { name: 'y', type: 'float64', values: component(mesh.positions, 1) },
    { name: 'z', type: 'float64', values: component(mesh.positions, 2) },
  ];
  if (mesh.colors) {
    ['red', 'green', 'blue'].forEach((name, k) => props.push({ name, type: 'uint8', values: component(mesh.colors!, k) }));
  }
  return encodePly(format, n, props, mesh.faces, 'written by xylemap');
}

/** Faces of a PLY mesh (for tests and tools that read meshes back): triangles only. */
export function readPlyMeshFd(fd: number, file: string): TriangleMesh {
  const cloud = readPlyFd(fd, file);
  const head = new Uint8Array(65536);
  const got = readSync(fd, head, 0, head.length, 0);
  const header = parsePlyHeader(head.subarray(0, got), file);
  const n = cloud.count;
  const positions = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    positions[3 * i] = cloud.x[i];
    positions[3 * i + 1] = cloud.y[i];
    positions[3 * i + 2] = cloud.z[i];
  }
  let colors: Uint8Array | undefined;
  if (cloud.extra.red && cloud.extra.green && cloud.extra.blue) {
    colors = new Uint8Array(3 * n);
    for (let i = 0; i < n; i++) {
      colors[3 * i] = cloud.extra.red[i] as number;
      colors[3 * i + 1] = cloud.extra.green[i] as number;
      colors[3 * i + 2] = cloud.extra.blue[i] as number;
    }
  }
  const faceEl = header.elements.find((e) => e.name === 'face');
  const faces = new Uint32Array(3 * (faceEl?.count ?? 0));
  if (faceEl) {
    const le = header.format !== 'binary_big_endian';
    if (header.format === 'ascii') {
      let skip = header.elements.filter((e) => header.elements.indexOf(e) < header.elements.indexOf(faceEl)).reduce((s, e) => s + e.count, 0);
      let f = 0;
      for (const line of readLines(fd, header.bodyStart)) {
        if (line.trim() === '') continue;
        if (skip > 0) {
          skip--;
          continue;
        }
        if (f >= faceEl.count) break;
        const t = line.trim().split(/\s+/).map(Number);
        if (t[0] !== 3) throw new XylemapError(`face ${f} has ${t[0]} vertices; only triangles are supported`, { file });
        faces.set(t.slice(1, 4), 3 * f++);
      }
    } else {
      const r = new ChunkReader(fd, header.bodyStart, file);
      for (const el of header.elements) {
        for (let i = 0; i < el.count; i++) {
          for (const p of el.properties) {
            if (p.countType) {
              r.need(TYPE_SIZE[p.countType]);
              const m = readValue(r.view, r.pos, p.countType, le);
              r.pos += TYPE_SIZE[p.countType];
              r.need(m * TYPE_SIZE[p.type]);
              if (el === faceEl && p.name.startsWith('vertex_ind')) {
                if (m !== 3) throw new XylemapError(`face ${i} has ${m} vertices; only triangles are supported`, { file });
                for (let k = 0; k < 3; k++) faces[3 * i + k] = readValue(r.view, r.pos + k * TYPE_SIZE[p.type], p.type, le);
              }
              r.pos += m * TYPE_SIZE[p.type];
            } else {
              r.need(TYPE_SIZE[p.type]);
              r.pos += TYPE_SIZE[p.type];
            }
          }
        }
        if (el === faceEl) break;
      }
    }
  }
  return colors ? { positions, colors, faces } : { positions, faces };
}
