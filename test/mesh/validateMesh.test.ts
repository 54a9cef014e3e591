import { describe, expect, it } from 'vitest';
import { makeMesh } from '../../solver/mesh/Mesh.ts';
import { validateMesh } from '../../solver/mesh/validateMesh.ts';
import { weldVertices } from '../../solver/mesh/weldVertices.ts';
import { orientTriangles } from '../../solver/mesh/orientTriangles.ts';
import { dropUnreferencedVertices } from '../../solver/mesh/dropUnreferencedVertices.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { rectangleGrid } from '../../meshes/shapes/patch.ts';
import { tetrahedron } from '../fixtures/meshes.ts';

const codes = (r: ReturnType<typeof validateMesh>) => [...r.errors, ...r.warnings].map((i) => i.code);

describe('validateMesh', () => {
  it('a clean mesh has no errors and no warnings', () => {
    const r = validateMesh(icosphere(4));
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([]);
  });

  it('reports a NaN coordinate with the vertex index', () => {
    const m = tetrahedron();
    m.positions[3 * 2 + 1] = NaN;
    const r = validateMesh(m);
    expect(r.errors[0].code).toBe('non-finite-coordinate');
    expect(r.errors[0].where).toEqual([2]);
    expect(r.errors[0].message).toContain('vertex 2');
  });

  it('reports an out-of-range index with the triangle', () => {
    const m = makeMesh(tetrahedron().positions, Uint32Array.from([0, 1, 2, 0, 3, 9]));
    const r = validateMesh(m);
    expect(r.errors[0].code).toBe('index-out-of-range');
    expect(r.errors[0].message).toContain('triangle 1 = (0, 3, 9)');
  });

  it('reports repeated corners and zero-area triangles', () => {
    const p = Float64Array.from([0, 0, 0, 1, 0, 0, 2, 0, 0, 0, 1, 0]);
    const r = validateMesh(makeMesh(p, Uint32Array.from([0, 1, 3, 0, 1, 2, 1, 1, 3])));
    expect(codes(r)).toContain('zero-area-triangle');
    expect(codes(r)).toContain('repeated-vertex-in-triangle');
    expect(r.errors.find((e) => e.code === 'zero-area-triangle')!.where).toEqual([1]);
  });

  it('reports a non-manifold edge shared by three triangles', () => {
    const p = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, -1, 0, 0, 0, 1]);
    const r = validateMesh(makeMesh(p, Uint32Array.from([0, 1, 2, 1, 0, 3, 0, 1, 4])));
    const e = r.errors.find((x) => x.code === 'non-manifold-edge')!;
    expect(e.message).toContain('(0, 1) in 3 triangles');
  });

  it('reports unreferenced vertices, and dropping them fixes it', () => {
    const t = tetrahedron();
    const p = new Float64Array(15);
    p.set(t.positions);
    p.set([5, 5, 5], 12);
    const m = makeMesh(p, t.triangles);
    expect(codes(validateMesh(m))).toContain('unreferenced-vertices');
    const d = dropUnreferencedVertices(m);
    expect(d.dropped).toBe(1);
    expect(validateMesh(d.mesh).errors).toEqual([]);
  });

  it('warns about duplicate vertices, and welding reconnects the surface', () => {
    // a 2×1 strip whose two halves do not share the middle vertices
    const p = Float64Array.from([0, 0, 0, 1, 0, 0, 1, 1, 0, 0, 1, 0, 1, 0, 0, 2, 0, 0, 2, 1, 0, 1, 1, 0]);
    const m = makeMesh(p, Uint32Array.from([0, 1, 2, 0, 2, 3, 4, 5, 6, 4, 6, 7]));
    const r = validateMesh(m);
    expect(r.warnings.map((w) => w.code)).toContain('duplicate-vertices');
    expect(meshTopology(m).componentCount).toBe(2);
    const w = weldVertices(m);
    expect(w.mergedVertices).toBe(2);
    expect(meshTopology(w.mesh).componentCount).toBe(1);
    expect(validateMesh(w.mesh).warnings).toEqual([]);
  });

  it('welds within a tolerance', () => {
    const p = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 1e-9, 1, 0]);
    expect(weldVertices(makeMesh(p, Uint32Array.from([0, 1, 2, 1, 3, 2])), 1e-6).mergedVertices).toBe(1);
    expect(weldVertices(makeMesh(p, Uint32Array.from([0, 1, 2, 1, 3, 2])), 0).mergedVertices).toBe(0);
  });

  it('warns about inconsistent orientation, and orientTriangles fixes it outward', () => {
    const s = icosphere(3);
    const tri = s.triangles.slice();
    for (const t of [5, 17, 40]) { const b = tri[3 * t + 1]; tri[3 * t + 1] = tri[3 * t + 2]; tri[3 * t + 2] = b; }
    const bad = makeMesh(s.positions, tri);
    expect(codes(validateMesh(bad))).toContain('inconsistent-orientation');
    const fixed = orientTriangles(bad);
    expect(fixed.flipped).toBe(3);
    expect(Array.from(fixed.mesh.triangles)).toEqual(Array.from(s.triangles));
  });

  it('turns an inside-out closed surface outward', () => {
    const s = icosphere(2);
    const tri = s.triangles.slice();
    for (let t = 0; t < tri.length; t += 3) { const b = tri[t + 1]; tri[t + 1] = tri[t + 2]; tri[t + 2] = b; }
    expect(Array.from(orientTriangles(makeMesh(s.positions, tri)).mesh.triangles)).toEqual(Array.from(s.triangles));
  });

  it('a Möbius band is reported as non-orientable', () => {
    const n = 12;
    const p = new Float64Array(3 * 2 * n);
    for (let i = 0; i < n; i++) {
      const a = (2 * Math.PI * i) / n;
      for (let s = 0; s < 2; s++) {
        const w = (s - 0.5) * 0.6;
        const v = 2 * i + s;
        p[3 * v] = (1 + w * Math.cos(a / 2)) * Math.cos(a);
        p[3 * v + 1] = (1 + w * Math.cos(a / 2)) * Math.sin(a);
        p[3 * v + 2] = w * Math.sin(a / 2);
      }
    }
    const t: number[] = [];
    for (let i = 0; i < n; i++) {
      const a0 = 2 * i, a1 = 2 * i + 1;
      const last = i === n - 1;
      const b0 = last ? 1 : 2 * (i + 1), b1 = last ? 0 : 2 * (i + 1) + 1;
      t.push(a0, b0, a1, a1, b0, b1);
    }
    const r = validateMesh(makeMesh(p, Uint32Array.from(t)));
    expect(codes(r)).toContain('non-orientable');
    expect(r.errors).toEqual([]);
  });

  it('reports a vertex where two sheets touch (a bow-tie) as non-manifold', () => {
    const p = Float64Array.from([0, 0, 0, 1, 0, 0, 1, 1, 0, -1, 0, 0, -1, -1, 0]);
    const r = validateMesh(makeMesh(p, Uint32Array.from([0, 1, 2, 0, 3, 4])));
    const w = r.warnings.find((x) => x.code === 'non-manifold-vertex')!;
    expect(w.where).toEqual([0]);
  });

  it('an open patch validates cleanly', () => {
    expect(validateMesh(rectangleGrid(1, 1, 4, 4)).errors).toEqual([]);
  });
});
