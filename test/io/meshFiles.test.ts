import { describe, expect, it } from 'vitest';
import { PLYLoader } from 'three/examples/jsm/loaders/PLYLoader.js';
import { parseMeshFile } from '../../solver/io/parseMeshFile.ts';
import { writePly } from '../../solver/io/writePly.ts';
import { writeObj } from '../../solver/io/writeObj.ts';
import { writeStl } from '../../solver/io/writeStl.ts';
import { writeOff } from '../../solver/io/writeOff.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';

const enc = (s: string) => new TextEncoder().encode(s);
const f32 = (a: Float64Array) => Array.from(a, (x) => Math.fround(x));

function expectSameMesh(got: Mesh, want: Mesh, single: boolean) {
  expect(Array.from(got.triangles)).toEqual(Array.from(want.triangles));
  expect(Array.from(got.positions)).toEqual(single ? f32(want.positions) : Array.from(want.positions));
}

describe('mesh import round trips', () => {
  const mesh = buildShape({ shape: 'limb-bud', vertices: 600 }).mesh;

  it('binary PLY: positions (float32), triangles and extra vertex properties', () => {
    const field = Float64Array.from({ length: mesh.positions.length / 3 }, (_, i) => Math.sin(i));
    const r = parseMeshFile(writePly(mesh, { properties: { morphogen: field } }), 'a.ply');
    expectSameMesh(r.mesh, mesh, true);
    expect(Array.from(r.vertexData.morphogen)).toEqual(f32(field));
  });

  it('ASCII PLY', () => {
    expectSameMesh(parseMeshFile(writePly(mesh, { encoding: 'ascii' }), 'a.ply').mesh, mesh, true);
  });

  it('OBJ keeps full precision and vertex order', () => {
    expectSameMesh(parseMeshFile(writeObj(mesh), 'a.obj').mesh, mesh, false);
  });

  it('OFF keeps full precision and vertex order', () => {
    expectSameMesh(parseMeshFile(writeOff(mesh), 'a.off').mesh, mesh, false);
  });

  it('binary STL: per-face corners are welded back into the same connected surface', () => {
    const s = icosphere(6);
    const r = parseMeshFile(writeStl(s), 'a.stl');
    expect(r.mesh.positions.length).toBe(s.positions.length);
    expect(r.mesh.triangles.length).toBe(s.triangles.length);
    expect(meshTopology(r.mesh).componentCount).toBe(1);
    expect(meshTopology(r.mesh).genus).toBe(0);
    // same triangles up to vertex renumbering: compare corner positions
    for (let t = 0; t < s.triangles.length; t++) {
      for (let k = 0; k < 3; k++) {
        expect(r.mesh.positions[3 * r.mesh.triangles[t] + k]).toBe(Math.fround(s.positions[3 * s.triangles[t] + k]));
      }
    }
  });

  it('ASCII STL and polygon faces in OBJ/OFF are read and triangulated', () => {
    const stl = `solid q\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nvertex 1 1 0\nendloop\nendfacet\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 1 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid q\n`;
    const a = parseMeshFile(enc(stl), 'q.stl');
    expect(a.mesh.positions.length / 3).toBe(4);
    expect(a.mesh.triangles.length / 3).toBe(2);
    const obj = parseMeshFile(enc('v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nf 1/1/1 2/2/2 3/3/3 4/4/4\n'), 'q.obj');
    expect(Array.from(obj.mesh.triangles)).toEqual([0, 1, 2, 0, 2, 3]);
    const off = parseMeshFile(enc('OFF\n4 1 0\n0 0 0\n1 0 0\n1 1 0\n0 1 0\n4 0 1 2 3 255 0 0\n'), 'q.off');
    expect(Array.from(off.mesh.triangles)).toEqual([0, 1, 2, 0, 2, 3]);
  });

  it('our PLY with colours reads back through three.js PLYLoader (a third-party reader) identically', () => {
    const s = icosphere(3);
    const n = s.positions.length / 3;
    const colors = Uint8Array.from({ length: 3 * n }, (_, i) => (i * 37) % 256);
    const bytes = writePly(s, { colors });
    const g = new PLYLoader().parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
    expect(Array.from(g.getAttribute('position').array)).toEqual(f32(s.positions));
    expect(Array.from(g.getIndex()!.array)).toEqual(Array.from(s.triangles));
    expect(g.getAttribute('color').count).toBe(n);
  });
});

describe('bad mesh files give an error naming the file and the problem', () => {
  const good = writePly(icosphere(2));
  const cases: [string, Uint8Array, RegExp][] = [
    ['empty.ply', new Uint8Array(0), /empty\.ply: is empty/],
    ['notes.ply', enc('hello world\n'), /notes\.ply: does not start with "ply"/],
    ['cut.ply', good.subarray(0, good.length - 40), /cut\.ply: needs at least \d+ bytes .* truncated/],
    ['head.ply', enc('ply\nformat ascii 1.0\nelement vertex 3\n'), /head\.ply: has no "end_header"/],
    ['cloud.ply', enc('ply\nformat ascii 1.0\nelement vertex 1\nproperty float x\nproperty float y\nproperty float z\nend_header\n0 0 0\n'), /cloud\.ply: holds 1 vertices but no faces/],
    ['short.ply', enc('ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n0 0 0\n1 0 0\n'), /short\.ply: needs at least \d+ bytes of data for 3 vertices and 1 faces .* truncated/],
    ['range.obj', enc('v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 7\n'), /range\.obj: face 1 uses vertex 7, but the file defines only 3 vertices/],
    ['cloud.obj', enc('v 0 0 0\nv 1 0 0\n'), /cloud\.obj: holds 2 vertices but no faces/],
    ['nan.obj', enc('v 0 zero 0\n'), /nan\.obj: line 1: vertex 1 has a coordinate that is not a finite number/],
    ['bin.obj', new Uint8Array([0, 1, 2, 3]), /bin\.obj: holds binary data \(a zero byte at byte 0/],
    ['cut.stl', writeStl(icosphere(2)).subarray(0, 500), /cut\.stl: binary STL header declares 80 triangles .* truncated/],
    ['open.stl', enc('solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\n'), /open\.stl: ASCII STL ends before "endsolid"/],
    ['none.stl', enc('solid x\nendsolid x\n'), /none\.stl: ASCII STL holds no facets/],
    ['word.off', enc('NOFF\n'), /word\.off: OFF variant "NOFF" is not supported/],
    ['junk.off', enc('hello\n'), /junk\.off: does not start with the OFF keyword/],
    ['cut.off', enc('OFF\n3 1 0\n0 0 0\n1 0 0\n'), /cut\.off: declares 3 vertices and 1 faces.* truncated/],
    ['range.off', enc('OFF\n3 1 0\n0 0 0\n1 0 0\n0 1 0\n3 0 1 5\n'), /range\.off: line 6: face 0 uses vertex 5/],
    ['mesh.xyz', enc('1 2 3\n'), /mesh\.xyz: has an unknown extension/],
  ];
  for (const [name, bytes, message] of cases) {
    it(name, () => {
      expect(() => parseMeshFile(bytes, name)).toThrow(message);
    });
  }
});
