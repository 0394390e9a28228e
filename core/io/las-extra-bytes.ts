import type { AttributeArray, ExtraBytesField, LasVlr } from '../types/point-cloud.js';
import { readText } from './las-header.js';

/**
 * The Extra Bytes VLR (user "LASF_Spec", record 4; LAS 1.4 R15 §2.5.4, Table 24): one 192-byte
 * descriptor per field. Data types 1–10 are scalars, 11–20 and 21–30 are the (deprecated, but
 * still written) 2- and 3-element arrays, 0 is "undocumented bytes" with the size in `options`.
 */
export const EXTRA_BYTES_USER = 'LASF_Spec';
export const EXTRA_BYTES_RECORD = 4;
const DESCRIPTOR_SIZE = 192;

/** Byte size of the scalar types 1–10. */
const SCALAR_SIZE = [0, 1, 1, 2, 2, 4, 4, 8, 8, 4, 8];

/** Scalar type (1–10) and element count of a data type code, or null for undocumented (0) / unknown. */
export function extraBytesShape(dataType: number): { scalar: number; elements: number } | null {
  if (dataType >= 1 && dataType <= 10) return { scalar: dataType, elements: 1 };
  if (dataType >= 11 && dataType <= 20) return { scalar: dataType - 10, elements: 2 };
  if (dataType >= 21 && dataType <= 30) return { scalar: dataType - 20, elements: 3 };
  return null;
}

export function scalarSize(scalar: number): number {
  return SCALAR_SIZE[scalar] ?? 0;
}

/** Parse every Extra Bytes VLR/EVLR in order and lay their fields out one after another (merging several VLRs). */
export function parseExtraBytesFields(vlrs: LasVlr[]): ExtraBytesField[] {
  const fields: ExtraBytesField[] = [];
  let byteOffset = 0;
  for (const vlr of vlrs) {
    if (vlr.userId !== EXTRA_BYTES_USER || vlr.recordId !== EXTRA_BYTES_RECORD) continue;
    const view = new DataView(vlr.data.buffer, vlr.data.byteOffset, vlr.data.byteLength);
    for (let at = 0; at + DESCRIPTOR_SIZE <= vlr.data.length; at += DESCRIPTOR_SIZE) {
      const dataType = vlr.data[at + 2];
      const options = vlr.data[at + 3];
      const shape = extraBytesShape(dataType);
      const byteSize = shape ? scalarSize(shape.scalar) * shape.elements : dataType === 0 ? options : 0;
      const field: ExtraBytesField = {
        name: readText(vlr.data, at + 4, 32),
        dataType,
        byteOffset,
        byteSize,
        description: readText(vlr.data, at + 160, 32),
      };
      if (shape) {
        const n = shape.elements;
        const read = (base: number) => Array.from({ length: n }, (_, k) => view.getFloat64(at + base + 8 * k, true));
        if (options & 8) field.scale = read(112);
        if (options & 16) field.offset = read(136);
        if (options & 1) field.noData = readAnyType(view, at + 40, shape.scalar, n);
      }
      fields.push(field);
      byteOffset += byteSize;
    }
  }
  return fields;
}

function readAnyType(view: DataView, at: number, scalar: number, n: number): number[] {
  const out: number[] = [];
  for (let k = 0; k < n; k++) {
    const p = at + 8 * k;
    // "anytype" slots are 8 bytes: integers are stored as int64/uint64, floats as double (§2.5.4).
    if (scalar === 9 || scalar === 10) out.push(view.getFloat64(p, true));
    else if (scalar % 2 === 0) out.push(Number(view.getBigInt64(p, true)));
    else out.push(Number(view.getBigUint64(p, true)));
  }
  return out;
}

/** One decoded column of an extra-bytes field (array fields give several columns). */
export interface ExtraColumn {
  name: string;
  /** Byte offset inside the whole point record. */
  recordOffset: number;
  scalar: number;
  scale: number;
  offset: number;
  /** True when scale/offset are declared: values are decoded to Float64. */
  scaled: boolean;
}

/** Column names of a field: the name itself, or `name_0`, `name_1`, … for array types. */
export function extraColumns(fields: ExtraBytesField[], baseSize: number, extraWidth: number): ExtraColumn[] {
  const columns: ExtraColumn[] = [];
  for (const f of fields) {
    const shape = extraBytesShape(f.dataType);
    if (!shape || f.byteOffset + f.byteSize > extraWidth) continue;
    const size = scalarSize(shape.scalar);
    for (let k = 0; k < shape.elements; k++) {
      const scaled = f.scale !== undefined || f.offset !== undefined;
      columns.push({
        name: shape.elements === 1 ? f.name : `${f.name}_${k}`,
        recordOffset: baseSize + f.byteOffset + k * size,
        scalar: shape.scalar,
        scale: f.scale?.[k] ?? 1,
        offset: f.offset?.[k] ?? 0,
        scaled,
      });
    }
  }
  return columns;
}

/** Allocate the array a column decodes into (optionally on SharedArrayBuffer memory for worker threads). */
export function allocateExtraColumn(column: ExtraColumn, count: number, shared = false): AttributeArray {
  const C = column.scaled ? Float64Array : SCALAR_ARRAY[column.scalar] ?? Float64Array;
  const bytes = count * C.BYTES_PER_ELEMENT;
  return new C(shared ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));
}

const SCALAR_ARRAY: Record<number, { new (b: ArrayBufferLike): AttributeArray; BYTES_PER_ELEMENT: number }> = {
  1: Uint8Array,
  2: Int8Array,
  3: Uint16Array,
  4: Int16Array,
  5: Uint32Array,
  6: Int32Array,
  7: BigUint64Array,
  8: BigInt64Array,
  9: Float32Array,
  10: Float64Array,
};

/** True when the described fields leave some bytes of the extra-bytes block undescribed. */
export function hasUndescribedBytes(fields: ExtraBytesField[], extraWidth: number): boolean {
  if (extraWidth === 0) return false;
  const covered = new Uint8Array(extraWidth);
  for (const f of fields) {
    if (!extraBytesShape(f.dataType)) continue;
    for (let b = f.byteOffset; b < Math.min(extraWidth, f.byteOffset + f.byteSize); b++) covered[b] = 1;
  }
  return covered.includes(0);
}

/** LAS data type code (1–10) for a typed array written as an extra-bytes field. */
export function dataTypeOfArray(array: AttributeArray): number {
  if (array instanceof Uint8Array) return 1;
  if (array instanceof Int8Array) return 2;
  if (array instanceof Uint16Array) return 3;
  if (array instanceof Int16Array) return 4;
  if (array instanceof Uint32Array) return 5;
  if (array instanceof Int32Array) return 6;
  if (array instanceof BigUint64Array) return 7;
  if (array instanceof BigInt64Array) return 8;
  if (array instanceof Float32Array) return 9;
  return 10;
}

/** Encode one Extra Bytes VLR payload for scalar fields. */
export function encodeExtraBytesVlr(fields: { name: string; dataType: number; description?: string; scale?: number; offset?: number; size?: number }[]): Uint8Array {
  const out = new Uint8Array(fields.length * DESCRIPTOR_SIZE);
  const view = new DataView(out.buffer);
  const enc = new TextEncoder();
  fields.forEach((f, i) => {
    const at = i * DESCRIPTOR_SIZE;
    out[at + 2] = f.dataType;
    let options = 0;
    if (f.scale !== undefined) {
      options |= 8;
      view.setFloat64(at + 112, f.scale, true);
    }
    if (f.offset !== undefined) {
      options |= 16;
      view.setFloat64(at + 136, f.offset, true);
    }
    // Data type 0 ("undocumented") stores its byte count in the options field.
    out[at + 3] = f.dataType === 0 ? (f.size ?? 0) : options;
    out.set(enc.encode(f.name).subarray(0, 32), at + 4);
    out.set(enc.encode(f.description ?? '').subarray(0, 32), at + 160);
  });
  return out;
}
