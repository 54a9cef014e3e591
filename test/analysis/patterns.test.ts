import { describe, expect, it } from 'vitest';
import { icosphere, icosahedron } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { measurePattern } from '../../solver/analysis/measurePattern.ts';
import { otsuThreshold } from '../../solver/analysis/otsuThreshold.ts';
import { patchEvents } from '../../solver/analysis/patchEvents.ts';

/** Sum of Gaussian bumps of width σ at the given centres. */
function bumps(mesh: Mesh, centres: number[][], sigma: number): Float64Array {
  const p = mesh.positions, n = p.length / 3;
  const f = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (const c of centres) f[i] += Math.exp(-((p[3 * i] - c[0]) ** 2 + (p[3 * i + 1] - c[1]) ** 2 + (p[3 * i + 2] - c[2]) ** 2) / (2 * sigma * sigma));
  }
  return f;
}

/** N well-spread vertex positions by farthest-point sampling. */
function spread(mesh: Mesh, count: number): number[][] {
  const p = mesh.positions, n = p.length / 3;
  const picked = [0];
  const dist = new Float64Array(n).fill(Infinity);
  while (picked.length < count) {
    const last = picked[picked.length - 1];
    let best = 0;
    for (let i = 0; i < n; i++) {
      dist[i] = Math.min(dist[i], (p[3 * i] - p[3 * last]) ** 2 + (p[3 * i + 1] - p[3 * last + 1]) ** 2 + (p[3 * i + 2] - p[3 * last + 2]) ** 2);
      if (dist[i] > dist[best]) best = i;
    }
    picked.push(best);
  }
  return picked.map((i) => [p[3 * i], p[3 * i + 1], p[3 * i + 2]]);
}

const count = (mesh: Mesh, field: Float64Array, rule: 'otsu' | 'mid-range' = 'otsu') =>
  measurePattern(mesh, field, lumpedMass(mesh), meshTopology(mesh), rule).patches;

describe('spot counting on fields with a known number of bumps', () => {
  it('on a sphere: 6 (octahedron) and 12 (icosahedron) bumps', () => {
    const mesh = icosphere(24, 1);
    const octa = [[1, 0, 0], [-1, 0, 0], [0, 1, 0], [0, -1, 0], [0, 0, 1], [0, 0, -1]];
    expect(count(mesh, bumps(mesh, octa, 0.2)).length).toBe(6);
    const ico = icosahedron().corners.map((c) => { const r = Math.hypot(c[0], c[1], c[2]); return c.map((x) => x / r); });
    const patches = count(mesh, bumps(mesh, ico, 0.15));
    expect(patches.length).toBe(12);
    // twelve equal spots: equal areas, centroids at the bump centres (to the mesh size)
    const areas = patches.map((p) => p.area);
    expect(Math.max(...areas) / Math.min(...areas)).toBeLessThan(1.15);
    for (const p of patches) {
      const r = Math.hypot(...p.centroid);
      const nearest = Math.min(...ico.map((c) => Math.hypot(p.centroid[0] / r - c[0], p.centroid[1] / r - c[1], p.centroid[2] / r - c[2])));
      expect(nearest).toBeLessThan(0.05);
    }
  });

  it('on the limb-bud paddle: 5 and 9 bumps at spread-out points, with both threshold rules', () => {
    const { mesh } = buildShape({ shape: 'limb-bud', vertices: 12000 });
    for (const n of [5, 9]) {
      const centres = spread(mesh, n);
      let sep = Infinity;
      for (let a = 0; a < n; a++) for (let b = a + 1; b < n; b++) sep = Math.min(sep, Math.hypot(centres[a][0] - centres[b][0], centres[a][1] - centres[b][1], centres[a][2] - centres[b][2]));
      const f = bumps(mesh, centres, sep / 8);
      expect(count(mesh, f).length).toBe(n);
      expect(count(mesh, f, 'mid-range').length).toBe(n);
    }
  });

  it("Otsu's threshold separates two levels and a flat field has no patches", () => {
    const values = [0, 0, 0, 1, 1, 0.02, 0.98];
    const t = otsuThreshold(values, values.map(() => 1));
    expect(t).toBeGreaterThan(0.02);
    expect(t).toBeLessThan(0.98);
    const mesh = icosphere(4, 1);
    expect(count(mesh, new Float64Array(mesh.positions.length / 3).fill(0.3)).length).toBe(0);
  });
});

describe('patch events between frames', () => {
  it('names splits, merges, insertions and losses', () => {
    //              vertices: 0   1   2   3   4   5   6   7
    const before = Int32Array.from([0, 0, 0, -1, 1, 1, -1, 2]);
    const after = Int32Array.from([0, -1, 1, -1, 2, 2, 3, -1]);
    const events = patchEvents(before, after);
    expect(events).toContainEqual({ kind: 'split', before: [0], after: [0, 1] });
    expect(events).toContainEqual({ kind: 'loss', before: [2], after: [] });
    expect(events).toContainEqual({ kind: 'insertion', before: [], after: [3] });
    expect(patchEvents(after, before)).toContainEqual({ kind: 'merge', before: [0, 1], after: [0] });
    expect(events.length).toBe(3);
  });
});
