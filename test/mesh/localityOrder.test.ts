import { describe, expect, it } from 'vitest';
import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';
import { localityOrder, renumberVertices, scatteredEdgeFraction } from '../../solver/mesh/localityOrder.ts';
import { repairMesh } from '../../solver/mesh/repairMesh.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { saveMeshFile } from '../../solver/io/meshFiles.ts';
import { loadScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper } from '../../solver/integrate/ReactionDiffusionStepper.ts';

const temp = useTempFiles('placode-order-');

/** A w × l grid of unit squares, each cut into two triangles, numbered row by row. */
function grid(w: number, l: number): Mesh {
  const p: number[] = [], t: number[] = [];
  for (let j = 0; j <= l; j++) for (let i = 0; i <= w; i++) p.push(i, j, 0);
  const at = (i: number, j: number) => j * (w + 1) + i;
  for (let j = 0; j < l; j++) for (let i = 0; i < w; i++) t.push(at(i, j), at(i + 1, j), at(i + 1, j + 1), at(i, j), at(i + 1, j + 1), at(i, j + 1));
  return makeMesh(Float64Array.from(p), Uint32Array.from(t));
}

/** The mesh with its vertices in a random order (seeded). */
function shuffled(mesh: Mesh, seed: number): Mesh {
  const n = mesh.positions.length / 3, rand = seededRandom(seed);
  const order = Uint32Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [order[i], order[j]] = [order[j], order[i]];
  }
  return renumberVertices(mesh, order).mesh;
}

const bandwidth = (m: Mesh) => {
  let b = 0;
  for (let t = 0; t < m.triangles.length; t += 3) for (let c = 0; c < 3; c++) b = Math.max(b, Math.abs(m.triangles[t + c] - m.triangles[t + ((c + 1) % 3)]));
  return b;
};

describe('locality order (reverse Cuthill–McKee)', () => {
  it('is a permutation, and on a shuffled w × l strip gives the bandwidth of the level structure: at most 2(w + 1)', () => {
    // Cuthill–McKee numbers the vertices level by level from a corner; on a grid the levels are
    // anti-diagonals of at most w + 1 vertices and every edge joins a level to itself or the next
    // (George & Liu 1981, §4.3), so no edge spans more than two levels' worth of numbers
    const w = 12, l = 300;
    const strip = shuffled(grid(w, l), 5);
    expect(bandwidth(strip)).toBeGreaterThan(1000);
    const order = localityOrder(strip);
    expect(Array.from(order).sort((a, b) => a - b)).toEqual(Array.from({ length: order.length }, (_, i) => i));
    expect(bandwidth(renumberVertices(strip, order).mesh)).toBeLessThanOrEqual(2 * (w + 1));
  });

  it('brings a scattered sphere\'s far edges from nearly all to a few per cent; geometry, triangles and per-vertex data travel with their vertices', () => {
    const sphere = icosphere(70, 1), n = sphere.positions.length / 3; // 49 002 vertices
    const scattered = shuffled(sphere, 9);
    // random numbers i, j of n: |i − j| ≤ W with probability 2W/n − (W/n)², W = 4096: far edges ≈ 0.84
    const W = 4096 / n;
    expect(Math.abs(scatteredEdgeFraction(scattered) - (1 - 2 * W + W * W))).toBeLessThan(0.02);
    const height = new Float64Array(n).map((_, i) => scattered.positions[3 * i + 2]);
    const r = repairMesh(scattered, { height }, { reorder: true });
    expect(scatteredEdgeFraction(r.mesh)).toBeLessThan(0.1);
    expect(r.notes[0]).toMatch(/renumbered the vertices in a locality order \(reverse Cuthill–McKee\): \d+(\.\d)? % of edges join vertices more than 4096 apart \(8\d % before\)/);
    for (let i = 0; i < n; i++) expect(r.vertexData.height[i]).toBe(r.mesh.positions[3 * i + 2]);
    // the same triangles, as sets of corner positions
    const key = (m: Mesh, t: number) => [0, 1, 2].map((c) => Array.from(m.positions.subarray(3 * m.triangles[t + c], 3 * m.triangles[t + c] + 3)).join(',')).join(' ');
    const before = new Set(Array.from({ length: scattered.triangles.length / 3 }, (_, t) => key(scattered, 3 * t)));
    for (let t = 0; t < r.mesh.triangles.length; t += 3) expect(before.has(key(r.mesh, t))).toBe(true);
  });

  it('a renumbered mesh steps to the same values, vertex for vertex (the neighbour sums in another order: round-off apart)', () => {
    const mesh = shuffled(icosphere(10, 1), 2);
    const order = localityOrder(mesh);
    const { mesh: renumbered, vertexMap } = renumberVertices(mesh, order);
    const kinetics = compileKinetics(['u', 'v'], { u: 'u - u^3 - v', v: '0.1*(u - v)' }, []);
    const run = (m: Mesh, start: (i: number, s: number) => number) => {
      const st = new ReactionDiffusionStepper({ mesh: m, kinetics, parameters: [], diffusion: [1e-3, 2e-3] }, { scheme: 'explicit', dt: 0.01 });
      for (let i = 0; i < m.positions.length / 3; i++) for (let s = 0; s < 2; s++) st.state[2 * i + s] = start(i, s);
      for (let k = 0; k < 20; k++) st.step(0.01 * k);
      return st.state.slice();
    };
    const a = run(mesh, (i, s) => Math.sin(4 * mesh.positions[3 * i + s]));
    const b = run(renumbered, (k, s) => Math.sin(4 * renumbered.positions[3 * k + s]));
    for (let i = 0; i < mesh.positions.length / 3; i++) for (let s = 0; s < 2; s++) expect(Math.abs(a[2 * i + s] - b[2 * vertexMap[i] + s])).toBeLessThan(1e-13);
  });

  it('a scenario on a scattered mesh file is told so and how to renumber it; with reorder: true it is renumbered and the note is gone', () => {
    const file = temp.path('scattered.ply');
    saveMeshFile(file, shuffled(icosphere(50, 1), 4));
    const scenario = (reorder: string) => temp.write(`s${reorder}.yaml`, `mesh: {file: scattered.ply${reorder}}\nkinetics: {model: gray-scott}\ntime: {end: 1}\n`);
    const plain = loadScenarioFile(scenario('')).resolved;
    expect(plain.meshNotes.join('\n')).toMatch(/the vertex order is scattered \([67]\d % of edges join vertices more than 4096 apart\).*add reorder: true to the mesh section.*placode mesh scattered\.ply --reorder -o NEW\.ply/);
    const ordered = loadScenarioFile(scenario(', reorder: true')).resolved;
    expect(ordered.meshNotes.join('\n')).not.toMatch(/scattered/);
    expect(ordered.meshNotes.join('\n')).toMatch(/renumbered the vertices/);
    expect(ordered.meshSource.reorder).toBe(true);
  });
});
