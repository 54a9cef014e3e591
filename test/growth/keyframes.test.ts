import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { saveMeshFile } from '../../solver/io/meshFiles.ts';
import { keyframeGrowth } from '../../solver/growth/keyframeGrowth.ts';
import { mapOntoSurface } from '../../solver/growth/mapOntoSurface.ts';
import { determinant3 } from '../../solver/growth/globalAlignment.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';


let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'placode-kf-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** x → s·Rz(θ)x + shift */
function moved(mesh: Mesh, s: number, theta: number, shift: [number, number, number]): Mesh {
  const p = Float64Array.from(mesh.positions);
  const c = Math.cos(theta), sn = Math.sin(theta);
  for (let i = 0; i < p.length; i += 3) {
    const x = p[i], y = p[i + 1];
    p[i] = s * (c * x - sn * y) + shift[0];
    p[i + 1] = s * (sn * x + c * y) + shift[1];
    p[i + 2] = s * p[i + 2] + shift[2];
  }
  return { positions: p, triangles: mesh.triangles };
}

describe('keyframe interpolation', () => {
  it('passes through every stage; cubic segments are C¹ at the stages, linear ones are not', () => {
    const stages = [new Float64Array([0, 0, 0]), new Float64Array([1, 0, 0]), new Float64Array([1, 2, 0])];
    const times = [0, 1, 3];
    for (const kind of ['linear', 'cubic'] as const) {
      const law = keyframeGrowth(times, stages, kind, '');
      const out = new Float64Array(3);
      const mesh = { positions: new Float64Array(3), triangles: new Uint32Array(0) };
      times.forEach((t, j) => { law.advance(mesh, 0, t, out); expect(Array.from(out)).toEqual(Array.from(stages[j])); });
      // one-sided derivatives at t = 1
      const h = 1e-6;
      const at = (t: number) => { law.advance(mesh, 0, t, out); return Array.from(out); };
      const left = at(1).map((x, i) => (x - at(1 - h)[i]) / h), right = at(1 + h).map((x, i) => (x - at(1)[i]) / h);
      const jump = Math.max(...left.map((x, i) => Math.abs(x - right[i])));
      if (kind === 'cubic') expect(jump).toBeLessThan(1e-4);
      else expect(jump).toBeGreaterThan(0.5);
    }
  });
});

describe('keyframes with another connectivity', () => {
  it('aligned by similarity, a rotated, scaled, shifted stage is reached without folds', () => {
    const start = icosphere(10, 1);
    const stage = moved(buildShape({ shape: 'ellipsoid', params: { a: 1, b: 1, c: 1 }, vertices: 3000 }).mesh, 1.3, 0.4, [0.5, -0.2, 0.1]);
    const map = mapOntoSurface(start, stage, 'similarity');
    expect(map.folded).toEqual([]);
    expect(map.collapsed).toEqual([]);
    expect(map.bridging).toEqual([]);
    expect(Math.cbrt(determinant3(map.transform.matrix))).toBeCloseTo(1.3, 2);
    // every mapped vertex lies on the stage's sphere (radius 1.3 about the shift), to its mesh's chord error
    for (let i = 0; i < map.positions.length; i += 3) {
      const r = Math.hypot(map.positions[i] - 0.5, map.positions[i + 1] + 0.2, map.positions[i + 2] - 0.1);
      expect(Math.abs(r - 1.3)).toBeLessThan(0.02);
    }
    // and the alignment moved vertices only slightly in the end
    expect(map.maxDistance).toBeLessThan(0.05);
  });

  it('in a run: same-connectivity stages grow the surface through their areas; a folding map is refused', async () => {
    const start = icosphere(8, 1);
    saveMeshFile(join(dir, 'start.ply'), start);
    saveMeshFile(join(dir, 'stage1.ply'), moved(start, 1.5, 0, [0, 0, 0]));
    saveMeshFile(join(dir, 'stage2.ply'), moved(start, 2, 0, [0, 0, 0]));
    const file = join(dir, 'kf.yaml');
    writeFileSync(file, `
mesh: {file: start.ply}
kinetics: {species: [u], reactions: {u: "0"}}
diffusion: {u: 0.1}
initial: {values: {u: "1 + x"}}
time: {scheme: imex, step: 0.01, end: 3}
output: {every: 1}
growth: {law: keyframes, keyframes: [{time: 1, file: stage1.ply}, {time: 2, file: stage2.ply}]}
analysis: {modes: 0}
`);
    const r = await run('run', file, '--out', join(dir, 'kf'), '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    const rows = readFileSync(join(dir, 'kf', 'metrics.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    // columns: time, step, u_min, u_mean, u_max, u_integral, patches, dominant, area, growth_factor, vertices
    expect(rows.map((x) => Number(x[9].toFixed(5)))).toEqual([1, 1.5, 2, 2]);
    // Σ M U conserved through the whole motion
    for (const x of rows) expect(x[5]).toBeCloseTo(rows[0][5], 9);
    // a stage of another shape (a torus) cannot be reached by closest points without folding
    saveMeshFile(join(dir, 'far.ply'), buildShape({ shape: 'torus', vertices: 3000 }).mesh, { force: true });
    writeFileSync(file, readFileSync(file, 'utf8').replace('[{time: 1, file: stage1.ply}, {time: 2, file: stage2.ply}]', '[{time: 1, file: far.ply}]'));
    const bad = await run('run', file, '--out', join(dir, 'kf-bad'), '--progress', 'none');
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/growth\.keyframes\[0\]\.file: carrying the mesh onto this stage folds \d+, collapses \d+ and stretches \d+ across gaps of \d+ triangles \(first: triangle \d+ near \(.*\)\) after affine alignment, a smooth registration .*; give landmarks .*, or an intermediate stage between t = 0 and 1; or tolerate a fraction with maxFolded/);
  });
});
