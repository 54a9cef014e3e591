import { describe, expect, it } from 'vitest';
import { refineMidpoint } from '../../solver/mesh/refineMidpoint.ts';
import { loopSubdivide } from '../../solver/mesh/loopSubdivide.ts';
import { prolongField } from '../../solver/mesh/Refinement.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { validateMesh } from '../../solver/mesh/validateMesh.ts';
import { icosphere, icosahedron } from '../../meshes/shapes/icosphere.ts';
import { rectangleGrid } from '../../meshes/shapes/patch.ts';
import { makeMesh } from '../../solver/mesh/Mesh.ts';

describe('refineMidpoint', () => {
  it('gives nV + nE vertices and 4nF triangles with the same topology and area on a flat patch', () => {
    const m = rectangleGrid(2, 1, 4, 2);
    const t = meshTopology(m);
    const r = refineMidpoint(m);
    expect(r.mesh.positions.length / 3).toBe(t.vertexCount + t.edgeCount);
    expect(r.mesh.triangles.length).toBe(4 * m.triangles.length);
    expect(meshArea(r.mesh)).toBeCloseTo(2, 12);
    expect(validateMesh(r.mesh).errors).toEqual([]);
    expect(validateMesh(r.mesh).warnings).toEqual([]);
    expect(meshTopology(r.mesh).eulerCharacteristic).toBe(1);
  });

  it('the icosahedron refined twice is the frequency-4 geodesic grid (before projection): 162 vertices', () => {
    const { corners, faces } = icosahedron();
    const m = makeMesh(Float64Array.from(corners.flat()), Uint32Array.from(faces.flat()));
    const r = refineMidpoint(refineMidpoint(m).mesh);
    expect(r.mesh.positions.length / 3).toBe(10 * 4 * 4 + 2);
    expect(meshTopology(r.mesh).genus).toBe(0);
  });

  it('carries a linear field across exactly (P1 interpolation)', () => {
    const m = icosphere(3);
    const f = new Float64Array(m.positions.length / 3);
    for (let i = 0; i < f.length; i++) f[i] = 2 * m.positions[3 * i] - m.positions[3 * i + 1] + 0.5 * m.positions[3 * i + 2] + 3;
    const r = refineMidpoint(m);
    const g = prolongField(f, r);
    for (let i = 0; i < g.length; i++) {
      const p = r.mesh.positions;
      expect(g[i]).toBeCloseTo(2 * p[3 * i] - p[3 * i + 1] + 0.5 * p[3 * i + 2] + 3, 12);
    }
  });
});

describe('loopSubdivide (Loop 1987)', () => {
  it('keeps a plane flat and reproduces affine height fields (affine invariance of the masks)', () => {
    const m = rectangleGrid(1, 1, 6, 6);
    const p = m.positions;
    for (let i = 0; i < p.length; i += 3) p[i + 2] = 0.3 * p[i] - 0.7 * p[i + 1] + 0.1;
    const r = loopSubdivide(m);
    const q = r.mesh.positions;
    for (let i = 0; i < q.length; i += 3) expect(q[i + 2]).toBeCloseTo(0.3 * q[i] - 0.7 * q[i + 1] + 0.1, 12);
  });

  it('uses β = 1/16 at a valence-6 vertex: a regular interior vertex moves to 5/8·v + 1/16·Σ neighbours', () => {
    const m = rectangleGrid(1, 1, 4, 4);
    // lift one interior vertex (checkerboard grids have valences 4 and 8: the general-n mask is checked)
    const t = meshTopology(m);
    let v = -1;
    for (let i = 0; i < t.vertexCount; i++) {
      const x = m.positions[3 * i], y = m.positions[3 * i + 1];
      if (x > 0 && x < 1 && y > 0 && y < 1) { v = i; break; }
    }
    m.positions[3 * v + 2] = 1;
    const n = t.vertexNeighbourOffsets[v + 1] - t.vertexNeighbourOffsets[v];
    const c = 0.375 + 0.25 * Math.cos((2 * Math.PI) / n);
    const beta = (0.625 - c * c) / n;
    const r = loopSubdivide(m);
    expect(r.mesh.positions[3 * v + 2]).toBeCloseTo(1 - n * beta, 14);
    if (n === 6) expect(beta).toBeCloseTo(1 / 16, 15);
    // the valence-6 value of β, from the formula itself
    const c6 = 0.375 + 0.25 * Math.cos(Math.PI / 3);
    expect((0.625 - c6 * c6) / 6).toBeCloseTo(1 / 16, 15);
  });

  it('smooths an icosahedron towards a round surface while keeping its topology', () => {
    const { corners, faces } = icosahedron();
    let m = makeMesh(Float64Array.from(corners.flat()), Uint32Array.from(faces.flat()));
    for (let k = 0; k < 3; k++) m = loopSubdivide(m).mesh;
    expect(meshTopology(m).genus).toBe(0);
    expect(validateMesh(m).errors).toEqual([]);
    let lo = Infinity, hi = 0;
    for (let i = 0; i < m.positions.length; i += 3) {
      const r = Math.hypot(m.positions[i], m.positions[i + 1], m.positions[i + 2]);
      lo = Math.min(lo, r); hi = Math.max(hi, r);
    }
    expect((hi - lo) / hi).toBeLessThan(0.05);
  });
});
