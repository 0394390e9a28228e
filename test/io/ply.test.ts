/**
 * PLY reading and writing, checked against the format description of Turk (1994), "The PLY
 * Polygon File Format" (header grammar, type names, list properties, the three body encodings),
 * including its cube example (from memory), and exact round trips of our writers.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { encodePlyMesh, encodePlyPoints, type TriangleMesh } from '../../core/io/ply.js';
import { readCloud, readPlyMesh } from '../../core/io/read-cloud.js';
import { createPointCloud } from '../../core/types/point-cloud.js';
import { XylemapError } from '../../core/util/errors.js';
import { createRandom } from '../../core/util/random.js';
import { differingArrays, tempDir } from './shared-data.js';

function file(name: string, data: string | Uint8Array): string {
  const path = join(tempDir(), name);
  writeFileSync(path, data);
  return path;
}

// Turk's cube example (from memory): 8 vertices, 6 quad faces as vertex_index lists.
const CUBE = `ply
format ascii 1.0
comment made by Greg Turk
comment this file is a cube
element vertex 8
property float x
property float y
property float z
element face 6
property list uchar int vertex_index
end_header
0 0 0
0 0 1
0 1 1
0 1 0
1 0 0
1 0 1
1 1 1
1 1 0
4 0 1 2 3
4 7 6 5 4
4 0 4 5 1
4 1 5 6 2
4 2 6 7 3
4 3 7 4 0
`;

function sampleCloud(n: number) {
  const rnd = createRandom(11);
  const axis = (o: number) => Float64Array.from({ length: n }, () => o + rnd.uniform(-5, 5));
  const c = createPointCloud(axis(478000), axis(5428000), axis(260));
  c.extra.intensity = Uint16Array.from({ length: n }, () => rnd.int(65536));
  c.extra.segment_id = Int32Array.from({ length: n }, () => rnd.int(2000) - 1);
  c.extra.curvature = Float32Array.from({ length: n }, () => rnd.normal());
  c.extra.label = Int8Array.from({ length: n }, () => rnd.int(256) - 128);
  return c;
}

describe('readCloud', () => {
  it('reads the vertices of the PLY spec cube and skips its quad faces', async () => {
    const c = await readCloud(file('cube.ply', CUBE));
    expect(c.source.format).toBe('ply');
    expect(c.count).toBe(8);
    expect([...c.x]).toEqual([0, 0, 0, 0, 1, 1, 1, 1]);
    expect([...c.z]).toEqual([0, 1, 1, 0, 0, 1, 1, 0]);
  });

  it('reads a big-endian binary PLY with an element before the vertices', async () => {
    // binary_big_endian body (Turk 1994): each property in header order, most significant byte first
    const head = 'ply\nformat binary_big_endian 1.0\nelement camera 1\nproperty list uchar float view\nelement vertex 2\nproperty double x\nproperty double y\nproperty double z\nproperty ushort intensity\nend_header\n';
    const body = new DataView(new ArrayBuffer(1 + 3 * 4 + 2 * (24 + 2)));
    body.setUint8(0, 3);
    [1.5, 2.5, 3.5].forEach((v, k) => body.setFloat32(1 + 4 * k, v, false));
    let at = 13;
    for (const [x, y, z, i] of [[5000000.0001, -2.25, 1e-3, 513], [-7, 8, 9, 65535]]) {
      body.setFloat64(at, x, false);
      body.setFloat64(at + 8, y, false);
      body.setFloat64(at + 16, z, false);
      body.setUint16(at + 24, i, false);
      at += 26;
    }
    const bytes = new Uint8Array([...Buffer.from(head, 'latin1'), ...new Uint8Array(body.buffer)]);
    const c = await readCloud(file('be.ply', bytes));
    expect([...c.x]).toEqual([5000000.0001, -7]);
    expect([...c.y]).toEqual([-2.25, 8]);
    expect([...c.extra.intensity]).toEqual([513, 65535]);
    expect(c.extra.intensity).toBeInstanceOf(Uint16Array);
  });

  it('refuses a PLY without end_header', async () => {
    await expect(readCloud(file('bad.ply', 'ply\nformat ascii 1.0\nelement vertex 1\nproperty float x\n'))).rejects.toThrow(/end_header/);
  });

  it('refuses a PLY whose vertices have no z', async () => {
    await expect(readCloud(file('noz.ply', 'ply\nformat ascii 1.0\nelement vertex 1\nproperty float x\nproperty float y\nend_header\n1 2\n'))).rejects.toThrow(/no scalar "z"/);
  });

  it('refuses a binary PLY whose body is shorter than its header promises', async () => {
    const full = encodePlyPoints(sampleCloud(10));
    const error = await readCloud(file('short.ply', full.subarray(0, full.length - 5))).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(XylemapError);
    expect((error as XylemapError).message).toMatch(/ends before/);
  });
});

describe('encodePlyPoints', () => {
  it('round-trips coordinates and typed scalar properties exactly in binary little endian', async () => {
    const c = sampleCloud(3000);
    const back = await readCloud(file('pts.ply', encodePlyPoints(c)));
    expect(differingArrays(c, back)).toEqual([]);
    expect(back.extra.segment_id).toBeInstanceOf(Int32Array);
    expect(back.extra.curvature).toBeInstanceOf(Float32Array);
  });

  it('round-trips coordinates and properties exactly in ascii', async () => {
    const c = sampleCloud(500);
    const bytes = encodePlyPoints(c, 'ascii');
    expect(Buffer.from(bytes.subarray(0, 30)).toString('latin1')).toMatch(/^ply\nformat ascii 1\.0\n/);
    const back = await readCloud(file('pts-ascii.ply', bytes));
    expect(differingArrays(c, back)).toEqual([]);
  });
});

describe('encodePlyMesh', () => {
  const mesh: TriangleMesh = {
    positions: Float64Array.of(0, 0, 0, 1, 0, 0, 0, 1, 0, 478000.1234, 5428000.5678, 266.25),
    colors: Uint8Array.of(255, 0, 0, 0, 255, 0, 0, 0, 255, 12, 34, 56),
    faces: Uint32Array.of(0, 1, 2, 0, 2, 3, 1, 3, 2),
  };

  it('round-trips positions, per-vertex colours and triangles in both encodings', () => {
    for (const format of ['binary_little_endian', 'ascii'] as const) {
      const back = readPlyMesh(file(`mesh-${format}.ply`, encodePlyMesh(mesh, format)));
      expect([...back.positions]).toEqual([...mesh.positions]);
      expect([...back.colors!]).toEqual([...mesh.colors!]);
      expect([...back.faces]).toEqual([...mesh.faces]);
    }
  });

  it('declares faces as a vertex_indices list with a uchar count (Turk 1994 list property)', () => {
    const text = Buffer.from(encodePlyMesh(mesh, 'ascii')).toString('latin1');
    expect(text).toMatch(/element face 3\nproperty list uchar uint vertex_indices\nend_header\n/);
    expect(text.trimEnd().split('\n').slice(-3)).toEqual(['3 0 1 2', '3 0 2 3', '3 1 3 2']);
  });

  it('refuses a face index past the last vertex', () => {
    expect(() => encodePlyMesh({ positions: new Float64Array(9), faces: Uint32Array.of(0, 1, 3) })).toThrow(/out of range/);
  });
});
