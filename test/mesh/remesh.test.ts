import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { marchingTetrahedra } from '../../meshes/shapes/marchingTetrahedra.ts';
import { isotropicRemesh } from '../../solver/mesh/isotropicRemesh.ts';
import { SurfaceProjector } from '../../solver/mesh/surfaceProjector.ts';
import { meshQuality } from '../../solver/fem/meshQuality.ts';
import * as meshQualityModule from '../../solver/fem/meshQuality.ts';
import { meshStatistics } from '../../solver/mesh/meshStatistics.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { edgeLengthStats } from '../../solver/mesh/edgeLengthStats.ts';
import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';

const temp = useTempFiles('placode-remesh-');

/** The unit sphere as marching tetrahedra cut it from the sampled field 1 − |x|² (slivers, uneven edges). */
function marchedSphere(h: number): Mesh {
  const n = Math.ceil(2.4 / h) + 1, origin: [number, number, number] = [-1.2, -1.2, -1.2];
  const values = new Float64Array(n * n * n);
  for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) {
    const x = origin[0] + i * h, y = origin[1] + j * h, z = origin[2] + k * h;
    values[i + n * (j + n * k)] = 1 - (x * x + y * y + z * z);
  }
  return marchingTetrahedra({ values, nx: n, ny: n, nz: n, origin, spacing: h });
}

/** Share of interior angles in [40°, 80°]. */
function anglesInRange(mesh: Mesh): number {
  const p = mesh.positions, t = mesh.triangles;
  let inside = 0;
  for (let f = 0; f < t.length / 3; f++) {
    const L = [0, 1, 2].map((k) => { const a = t[3 * f + ((k + 1) % 3)], b = t[3 * f + ((k + 2) % 3)]; return Math.hypot(p[3 * a] - p[3 * b], p[3 * a + 1] - p[3 * b + 1], p[3 * a + 2] - p[3 * b + 2]); });
    for (let k = 0; k < 3; k++) {
      const [x, y, z] = [L[k], L[(k + 1) % 3], L[(k + 2) % 3]];
      const angle = (Math.acos((y * y + z * z - x * x) / (2 * y * z)) * 180) / Math.PI;
      if (angle >= 40 && angle <= 80) inside++;
    }
  }
  return inside / t.length;
}

/** Largest distance from the remeshed triangles (their centroids) to the input surface. */
function hausdorffToInput(output: Mesh, input: Mesh): number {
  const projector = new SurfaceProjector(input);
  const p = output.positions, t = output.triangles, q = new Float64Array(3);
  let far = 0;
  for (let f = 0; f < t.length / 3; f++) {
    for (let d = 0; d < 3; d++) q[d] = (p[3 * t[3 * f] + d] + p[3 * t[3 * f + 1] + d] + p[3 * t[3 * f + 2] + d]) / 3;
    projector.project(q, 0);
    far = Math.max(far, projector.distance);
  }
  return far;
}

describe('isotropic remeshing (Botsch & Kobbelt 2004)', () => {
  it('a marching-tetrahedra sphere: well-shaped triangles, the area and topology kept, close to the input, eigenvalues within the P1 error of l(l+1)', () => {
    const input = marchedSphere(0.05);
    const before = meshQuality(input);
    expect(before.slivers).toBeGreaterThan(100);
    // the unremeshed scan: its explicit step is a tiny share of a well-shaped mesh's, and the warning names the worst triangles
    expect(before.explicitStepRatio).toBeLessThan(1e-4);
    const { qualityWarnings } = meshQualityModule;
    expect(qualityWarnings(before).join('\n')).toContain(`triangle ${before.worst[0].triangle} (vertices ${before.worst[0].vertices.join(', ')}`);
    const r = isotropicRemesh(input, { edge: 0.1 });
    const q = meshQuality(r.mesh);
    expect(q.explicitStepRatio / before.explicitStepRatio).toBeGreaterThan(100);
    expect(qualityWarnings(q)).toEqual([]);
    expect(q.angles.min).toBeGreaterThanOrEqual(25);
    expect(anglesInRange(r.mesh)).toBeGreaterThanOrEqual(0.95);
    expect(Math.abs(meshArea(r.mesh) / meshArea(input) - 1)).toBeLessThan(0.005);
    expect(hausdorffToInput(r.mesh, input)).toBeLessThan(0.1 * r.edge);
    const s = meshStatistics(r.mesh);
    expect([s.genus, s.boundaryLoops, s.components, s.errors.length]).toEqual([0, 0, 1, 0]);
    // Dziuk (1988): second order; the refinement study (test/mesh/meshQuality.test.ts) puts the P1 error of
    // a mode spanned by N mean edges per wavelength at about 2.4 %·(10/N)², within a factor 1.6
    const h = edgeLengthStats(r.mesh).mean;
    const eig = laplaceBeltramiEigenpairs(r.mesh, { count: 25, mass: 'lumped' });
    for (let l = 1; l <= 4; l++) {
      let sum = 0;
      for (let j = l * l; j < (l + 1) ** 2; j++) sum += eig.values[j];
      const error = Math.abs(sum / (2 * l + 1) / (l * (l + 1)) - 1);
      const N = (2 * Math.PI) / Math.sqrt(l * (l + 1)) / h;
      expect(error).toBeLessThan(1.6 * 0.024 * (10 / N) ** 2 + 0.005); // (+ the marched sphere's own area deficit)
    }
  });

  it('a scan-like limb bud: slivers gone, the explicit step many times larger, the quality warning gone; per-vertex data carried by interpolation', () => {
    const input = buildShape({ shape: 'scan-bud', vertices: 20000 }).mesh;
    const before = meshQuality(input);
    // a per-vertex value linear in position: interpolated at each new vertex's closest point it is exact
    const n = input.positions.length / 3, height = new Float64Array(n);
    for (let i = 0; i < n; i++) height[i] = 2 * input.positions[3 * i] - input.positions[3 * i + 2];
    const r = isotropicRemesh(input, { vertices: 5000, vertexData: { height } });
    const after = meshQuality(r.mesh);
    expect(before.slivers).toBeGreaterThan(100);
    expect(after.slivers).toBe(0);
    expect(after.angles.min).toBeGreaterThanOrEqual(25);
    expect(anglesInRange(r.mesh)).toBeGreaterThanOrEqual(0.95);
    console.log(`scan-bud ${n} → ${r.mesh.positions.length / 3} vertices: min angle ${before.angles.min.toFixed(1)}° → ${after.angles.min.toFixed(1)}°, ${(100 * anglesInRange(r.mesh)).toFixed(1)} % of angles in [40°, 80°], explicit step ${before.explicitStepRatio.toFixed(4)} → ${after.explicitStepRatio.toFixed(3)} of a well-shaped mesh's (×${(after.explicitStepRatio / before.explicitStepRatio).toFixed(0)}), area ${(100 * (meshArea(r.mesh) / meshArea(input) - 1)).toFixed(2)} %`);
    expect(after.explicitStepRatio / before.explicitStepRatio).toBeGreaterThan(20);
    expect(after.explicitStepRatio).toBeGreaterThan(0.02); // no quality warning
    const p = r.mesh.positions, h = r.vertexData.height;
    for (let i = 0; i < h.length; i++) expect(Math.abs(h[i] - (2 * p[3 * i] - p[3 * i + 2]))).toBeLessThan(1e-5);
    expect(meshStatistics(r.mesh).genus).toBe(0);
  }, 60_000);

  it('an open surface keeps its boundary loop; the command line and scenarios remesh, and say what they did', async () => {
    const bud = buildShape({ shape: 'limb-bud', vertices: 8000 }).mesh;
    const r = isotropicRemesh(bud, { vertices: 2000 });
    const s = meshStatistics(r.mesh);
    expect([s.genus, s.boundaryLoops, s.errors.length]).toEqual([0, 1, 0]);
    const out = temp.path('remeshed.ply');
    const m = await run('mesh', 'scan-bud', '--vertices', '8000', '--remesh', '2000', '-o', out, '--json');
    expect(m.code, m.err).toBe(0);
    const j = JSON.parse(m.out);
    expect(j.quality.slivers).toBe(0);
    expect(Math.abs(j.vertices - 2000) / 2000).toBeLessThan(0.15);
    const scenario = temp.write('remesh.yaml', `mesh: {file: ${out}, remesh: {edge: 0.08}}\nkinetics: {model: gray-scott}\ntime: {end: 1}\n`);
    const c = JSON.parse((await run('run', scenario, '--check')).out);
    expect(c.mesh.remesh).toEqual({ edge: 0.08 });
    expect(c.meshNotes.join('\n')).toMatch(/remeshed isotropically \(Botsch–Kobbelt\) to edge 0\.08/);
    const bad = await run('mesh', 'sphere', '--edge', '0.1');
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--edge sets the target edge length of --remesh: add --remesh/);
    void readFileSync; void join;
  }, 60_000);
});

describe('creases, holes and terraces', () => {
  /** A cube [−1, 1]³ of n × n squares a face, welded. */
  function cube(n: number): Mesh {
    const p: number[] = [], t: number[] = [];
    const index = new Map<string, number>();
    const vertex = (x: number, y: number, z: number) => {
      const key = [x, y, z].map((c) => c.toFixed(9)).join(',');
      let v = index.get(key);
      if (v === undefined) { v = p.length / 3; p.push(x, y, z); index.set(key, v); }
      return v;
    };
    for (const axis of [0, 1, 2]) for (const side of [-1, 1]) {
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        const at = (a: number, b: number) => { const c = [0, 0, 0]; c[axis] = side; c[(axis + 1) % 3] = -1 + (2 * a) / n; c[(axis + 2) % 3] = -1 + (2 * b) / n; return vertex(c[0], c[1], c[2]); };
        const [v00, v10, v11, v01] = [at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j + 1)];
        if (side > 0) t.push(v00, v10, v11, v00, v11, v01);
        else t.push(v00, v11, v10, v00, v01, v11);
      }
    }
    return makeMesh(Float64Array.from(p), Uint32Array.from(t));
  }

  it('with a crease angle the cube keeps its corners and edges (its area to 0.5 %); without, a coarse remesh rounds them', () => {
    const input = cube(16);
    expect(meshStatistics(input).errors).toEqual([]);
    const keep = isotropicRemesh(input, { edge: 0.25, creaseAngle: 45 });
    const corners = (m: Mesh) => { let c = 0; for (let i = 0; i < m.positions.length / 3; i++) if ([0, 1, 2].every((d) => Math.abs(Math.abs(m.positions[3 * i + d]) - 1) < 1e-9)) c++; return c; };
    expect(corners(keep.mesh)).toBe(8);
    expect(Math.abs(meshArea(keep.mesh) / 24 - 1)).toBeLessThan(0.005);
    const round = isotropicRemesh(input, { edge: 0.25 });
    expect(meshArea(round.mesh)).toBeLessThan(meshArea(keep.mesh));
    expect(meshStatistics(keep.mesh).errors).toEqual([]);
  });

  it('fills small holes with fans oriented as the surface, leaves larger loops open; Taubin smoothing keeps the volume that plain Laplacian smoothing loses', async () => {
    const { fillHoles } = await import('../../solver/mesh/fillHoles.ts');
    const { taubinSmooth } = await import('../../solver/mesh/taubinSmooth.ts');
    // a sphere with two triangles' worth of hole: remove two adjacent triangles
    const sphere = buildShape({ shape: 'sphere', vertices: 642 }).mesh;
    const holed = makeMesh(sphere.positions, Uint32Array.from(Array.from(sphere.triangles).slice(6)));
    expect(meshStatistics(holed).boundaryLoops).toBe(1);
    const filled = fillHoles(holed, 10);
    expect(filled.filled).toEqual([4]);
    const s = meshStatistics(filled.mesh);
    expect([s.boundaryLoops, s.genus, s.errors.length, s.warnings.length]).toEqual([0, 0, 0, 0]); // closed, consistently oriented
    const bud = buildShape({ shape: 'limb-bud', vertices: 2000 }).mesh;
    const open = fillHoles(bud, 10);
    expect(open.filled).toEqual([]);
    expect(open.kept.length).toBe(1); // the bud's base
    // volume of a closed surface, by the divergence theorem
    const volume = (m: Mesh) => { let v = 0; const p = m.positions, t = m.triangles; for (let f = 0; f < t.length / 3; f++) { const [a, b, c] = [3 * t[3 * f], 3 * t[3 * f + 1], 3 * t[3 * f + 2]]; v += (p[a] * (p[b + 1] * p[c + 2] - p[b + 2] * p[c + 1]) - p[a + 1] * (p[b] * p[c + 2] - p[b + 2] * p[c]) + p[a + 2] * (p[b] * p[c + 1] - p[b + 1] * p[c])) / 6; } return v; };
    const scan = buildShape({ shape: 'scan-bud', vertices: 8000 }).mesh;
    const v0 = volume(scan);
    const taubin = taubinSmooth(scan, 10), laplace = taubinSmooth(scan, 20, 0.5, 0.5 * 0); // 20 plain λ steps (μ = 0)
    expect(Math.abs(volume(taubin) / v0 - 1)).toBeLessThan(0.01);
    expect(1 - volume(laplace) / v0).toBeGreaterThan(3 * Math.abs(volume(taubin) / v0 - 1));
    expect(meshQuality(taubin).angles.min).toBeGreaterThan(meshQuality(scan).angles.min);
  });
});

describe('remeshing what a scan brings', () => {
  it('two separate pieces stay two; a non-manifold scan is refused with the place named and nothing written', async () => {
    const a = buildShape({ shape: 'sphere', vertices: 1000 }).mesh;
    const n = a.positions.length / 3;
    const both = makeMesh(Float64Array.from([...a.positions, ...Array.from(a.positions, (x, i) => (i % 3 === 0 ? x + 3 : x))]), Uint32Array.from([...a.triangles, ...Array.from(a.triangles, (v) => v + n)]));
    const r = isotropicRemesh(both, { edge: 0.2 });
    const s = meshStatistics(r.mesh);
    expect([s.components, s.genus, s.errors.length]).toEqual([2, 0, 0]);
    // three triangles on one edge: not a manifold
    const fin = makeMesh(Float64Array.from([...a.positions, 0, 0, 2]), Uint32Array.from([...a.triangles, a.triangles[0], a.triangles[1], n]));
    const file = temp.path('fin.ply'), out = temp.path('fin-remeshed.ply');
    const { saveMeshFile } = await import('../../solver/io/meshFiles.ts');
    saveMeshFile(file, fin);
    const m = await run('mesh', file, '--remesh', '500', '-o', out);
    expect(m.code).not.toBe(0);
    expect(m.err).toMatch(/cannot remesh a mesh with errors: .*edge/i);
    const { existsSync } = await import('node:fs');
    expect(existsSync(out)).toBe(false);
  }, 60_000);
});
