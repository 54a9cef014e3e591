import { describe, expect, it } from 'vitest';
import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { validateMesh } from '../../solver/mesh/validateMesh.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { edgeLengthStats } from '../../solver/mesh/edgeLengthStats.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';

function signedVolume(m: Mesh): number {
  const p = m.positions, t = m.triangles;
  let v = 0;
  for (let i = 0; i < t.length; i += 3) {
    const a = 3 * t[i], b = 3 * t[i + 1], c = 3 * t[i + 2];
    v += p[a] * (p[b + 1] * p[c + 2] - p[b + 2] * p[c + 1]) - p[a + 1] * (p[b] * p[c + 2] - p[b + 2] * p[c]) + p[a + 2] * (p[b] * p[c + 1] - p[b + 1] * p[c]);
  }
  return v / 6;
}

// Exact areas of the smooth surfaces (elementary geometry); the inscribed
// triangle meshes approach them at O(h²), so the relative tolerance below is a
// small multiple of (h / radius of curvature)².
const exactArea: Record<string, (p: Record<string, number>) => number> = {
  sphere: (p) => 4 * Math.PI * p.radius ** 2,
  torus: (p) => 4 * Math.PI ** 2 * p.R * p.r,
  capsule: (p) => 4 * Math.PI * p.r ** 2 + 2 * Math.PI * p.r * p.L,
  dome: (p) => 2 * Math.PI * p.R ** 2 * (1 - Math.cos((p.angle * Math.PI) / 180)),
  patch: (p) => p.a * p.b,
};
const curvatureRadius: Record<string, (p: Record<string, number>) => number> = {
  sphere: (p) => p.radius, torus: (p) => p.r, capsule: (p) => p.r, dome: (p) => p.R, patch: () => Infinity,
};

describe('shape library', () => {
  for (const name of Object.keys(SHAPES)) {
    it(`${name}: valid, declared topology, near the vertex target, outward where closed`, () => {
      const { mesh, params } = buildShape({ shape: name, vertices: 6000 });
      const n = mesh.positions.length / 3;
      expect(Math.abs(n - 6000) / 6000).toBeLessThan(0.15);
      const report = validateMesh(mesh);
      expect(report.errors).toEqual([]);
      expect(report.warnings).toEqual([]);
      const topo = meshTopology(mesh);
      expect(topo.componentCount).toBe(1);
      expect(topo.boundaryLoops.length).toBe(SHAPES[name].closed ? 0 : 1);
      expect(topo.genus).toBe(name === 'torus' ? 1 : 0);
      if (SHAPES[name].closed) expect(signedVolume(mesh)).toBeGreaterThan(0);
      const e = edgeLengthStats(mesh);
      if (!SHAPES[name].scanLike) expect(e.max / e.min).toBeLessThan(8); // (a scan-like shape is irregular on purpose)
      if (exactArea[name]) {
        const A = exactArea[name](params);
        const rel = Math.abs(meshArea(mesh) - A) / A;
        const h = e.mean / curvatureRadius[name](params);
        expect(rel).toBeLessThan(Math.max(1e-12, 0.5 * h * h));
      }
    });
  }

  it('icosphere has 10ν² + 2 vertices and its area converges to 4π at second order', () => {
    const errs: number[] = [];
    for (const nu of [8, 16, 32]) {
      const m = icosphere(nu);
      expect(m.positions.length / 3).toBe(10 * nu * nu + 2);
      errs.push(4 * Math.PI - meshArea(m));
    }
    expect(Math.log2(errs[0] / errs[1])).toBeGreaterThan(1.9);
    expect(Math.log2(errs[1] / errs[2])).toBeGreaterThan(1.9);
  });

  it('limb-bud: open round base at x = 0, tip at x = length, flat paddle (width > thickness)', () => {
    const { mesh, params } = buildShape({ shape: 'limb-bud', params: { length: 4, paddleWidth: 1.2, paddleThickness: 0.25 }, vertices: 4000 });
    const p = mesh.positions;
    let xmax = 0, ymax = 0, zmax = 0;
    for (let i = 0; i < p.length; i += 3) { xmax = Math.max(xmax, p[i]); ymax = Math.max(ymax, Math.abs(p[i + 1])); zmax = Math.max(zmax, Math.abs(p[i + 2])); }
    expect(xmax).toBeCloseTo(params.length, 10);
    expect(ymax).toBeCloseTo(1.2, 2);
    expect(zmax).toBeLessThan(params.baseRadius + 1e-9);
    const loop = meshTopology(mesh).boundaryLoops[0];
    for (const v of loop) {
      expect(p[3 * v]).toBeCloseTo(0, 12);
      expect(Math.hypot(p[3 * v + 1], p[3 * v + 2])).toBeCloseTo(params.baseRadius, 10);
    }
  });

  it('spiral shell: each whorl is the previous one scaled by the expansion rate', () => {
    const { mesh } = buildShape({ shape: 'spiral-shell', params: { expansion: 2.5, spire: 0, whorls: 2 }, vertices: 4000 });
    const p = mesh.positions;
    // aperture ring centre sits at distance `size` = 1 from the axis; the apex near 2.5^-2
    let rmax = 0, rmin = Infinity;
    for (let i = 0; i < p.length; i += 3) { const r = Math.hypot(p[i], p[i + 1]); rmax = Math.max(rmax, r); rmin = Math.min(rmin, r); }
    expect(rmax).toBeCloseTo(1 + 0.3, 2); // centre distance + tube radius (tubeRatio 0.3)
    expect(rmin).toBeLessThan(1 / 2.5 ** 2);
  });

  it('rejects unknown shapes, unknown parameters and impossible proportions with every problem listed', () => {
    expect(() => buildShape({ shape: 'blob' })).toThrow(/unknown shape "blob".*sphere/);
    expect(() => buildShape({ shape: 'sphere', params: { radiu: 2 } })).toThrow(/unknown parameter "radiu".*radius/);
    expect(() => buildShape({ shape: 'torus', params: { R: 1, r: 1.5 } })).toThrow(/must be smaller than R/);
    expect(() => buildShape({ shape: 'spiral-shell', params: { tubeRatio: 0.6 } })).toThrow(/overlap/);
    expect(() => buildShape({ shape: 'limb-bud', params: { length: 1 } })).toThrow(/paddle does not fit/);
    expect(() => buildShape({ shape: 'capsule', params: { r: -1, L: -2 } })).toThrow(/r must be > 0.*L must be ≥ 0/);
    expect(() => buildShape({ shape: 'sphere', vertices: 2 })).toThrow(/vertices must be/);
  });
});
