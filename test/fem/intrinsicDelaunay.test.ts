import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { intrinsicDelaunayOperators } from '../../solver/fem/intrinsicDelaunay.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { meshQuality } from '../../solver/fem/meshQuality.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { csrEntry } from '../../solver/linalg/CsrMatrix.ts';

const temp = useTempFiles('placode-idt-');

/**
 * Split a share of a mesh's edges at a point a fraction `at` along them (on the chord), each triangle
 * split at most once: near-degenerate caps and needles, as a scan's mesher leaves them.
 */
function splitEdges(mesh: Mesh, share: number, at: number, seed = 3): Mesh {
  let s = seed;
  const rand = () => (s = (s * 16807) % 2147483647) / 2147483647;
  const p = Array.from(mesh.positions), t = mesh.triangles, nF = t.length / 3;
  const faceOf = new Map<string, number[]>();
  for (let f = 0; f < nF; f++) for (let k = 0; k < 3; k++) {
    const a = t[3 * f + k], b = t[3 * f + ((k + 1) % 3)];
    const key = `${Math.min(a, b)},${Math.max(a, b)}`;
    faceOf.set(key, [...(faceOf.get(key) ?? []), f]);
  }
  const split = new Map<number, [number, number, number]>(); // face → (a, b) of its split edge, new vertex
  for (const [key, faces] of faceOf) {
    if (faces.some((f) => split.has(f)) || rand() > share) continue;
    const [a, b] = key.split(',').map(Number);
    const v = p.length / 3;
    for (let d = 0; d < 3; d++) p.push((1 - at) * p[3 * a + d] + at * p[3 * b + d]);
    for (const f of faces) split.set(f, [a, b, v]);
  }
  const out: number[] = [];
  for (let f = 0; f < nF; f++) {
    const tri = [t[3 * f], t[3 * f + 1], t[3 * f + 2]];
    const sp = split.get(f);
    if (!sp) { out.push(...tri); continue; }
    const k = [0, 1, 2].find((j) => { const x = tri[j], y = tri[(j + 1) % 3]; return (x === sp[0] && y === sp[1]) || (x === sp[1] && y === sp[0]); })!;
    const [x, y, z] = [tri[k], tri[(k + 1) % 3], tri[(k + 2) % 3]];
    out.push(x, sp[2], z, sp[2], y, z);
  }
  return makeMesh(Float64Array.from(p), Uint32Array.from(out));
}

/** Mean eigenvalue of each degree-l cluster, relative error against l(l+1). */
function degreeErrors(values: Float64Array, lmax: number): number[] {
  const out: number[] = [];
  for (let l = 1; l <= lmax; l++) {
    let s = 0;
    for (let j = l * l; j < (l + 1) ** 2; j++) s += values[j];
    out.push(s / (2 * l + 1) / (l * (l + 1)) - 1);
  }
  return out;
}

describe('the intrinsic Delaunay Laplacian (Bobenko & Springborn 2007; Sharp, Soliman & Crane 2019)', () => {
  it('on a Delaunay mesh no edge flips, and the operators are the cotangent ones', () => {
    const mesh = icosphere(6, 1);
    const idt = intrinsicDelaunayOperators(mesh);
    expect(idt.flips).toBe(0);
    const K = cotanStiffness(mesh), m = lumpedMass(mesh);
    for (let i = 0; i < K.rows; i += 7) for (let q = K.rowOffsets[i]; q < K.rowOffsets[i + 1]; q++) expect(csrEntry(idt.stiffness, i, K.columns[q])).toBeCloseTo(K.values[q], 12);
    for (let i = 0; i < m.length; i++) expect(idt.mass[i]).toBeCloseTo(m[i], 14);
  });

  it('on a sliver-rich sphere: every weight nonnegative (the cotangent ones are not), K symmetric with K·1 = 0, the area kept; eigenvalues no farther from l(l+1)', () => {
    const mesh = splitEdges(icosphere(12, 1), 0.3, 0.01);
    const q = meshQuality(mesh);
    expect(q.slivers).toBeGreaterThan(500);
    const K = cotanStiffness(mesh);
    const negative = (A: typeof K) => { let c = 0; for (let i = 0; i < A.rows; i++) for (let p = A.rowOffsets[i]; p < A.rowOffsets[i + 1]; p++) if (A.columns[p] !== i && A.values[p] > 1e-12) c++; return c; };
    expect(negative(K)).toBeGreaterThan(100);
    const idt = intrinsicDelaunayOperators(mesh);
    expect(idt.flips).toBeGreaterThan(0);
    expect(negative(idt.stiffness)).toBe(0);
    const S = idt.stiffness;
    for (let i = 0; i < S.rows; i++) {
      let row = 0, scale = 0;
      for (let p = S.rowOffsets[i]; p < S.rowOffsets[i + 1]; p++) {
        row += S.values[p];
        scale = Math.max(scale, Math.abs(S.values[p]));
        expect(csrEntry(S, S.columns[p], i)).toBe(S.values[p]);
      }
      expect(Math.abs(row)).toBeLessThanOrEqual(1e-12 * scale);
    }
    expect(idt.mass.reduce((a, b) => a + b, 0)).toBeCloseTo(meshArea(mesh), 10);
    const plain = degreeErrors(laplaceBeltramiEigenpairs(mesh, { count: 25, mass: 'lumped' }).values, 4);
    const intrinsic = degreeErrors(laplaceBeltramiEigenpairs(mesh, { count: 25, operators: { stiffness: idt.stiffness, mass: idt.mass } }).values, 4);
    console.log(`sliver-rich sphere (${mesh.positions.length / 3} vertices, ${q.slivers} slivers, ${idt.flips} flips): l = 1…4 eigenvalue errors cotangent ${plain.map((e) => (100 * e).toFixed(2) + ' %').join(', ')}; intrinsic Delaunay ${intrinsic.map((e) => (100 * e).toFixed(2) + ' %').join(', ')}`);
    for (let l = 0; l < 4; l++) expect(Math.abs(intrinsic[l])).toBeLessThanOrEqual(Math.abs(plain[l]) + 1e-4);
  });

  it('a scenario chooses it with fem.laplacian (recorded), modes with --laplacian; a growing surface is refused', async () => {
    const file = temp.write('idt.yaml', 'mesh: {shape: sphere, vertices: 1000}\nkinetics: {model: schnakenberg, parameters: {gamma: 50}}\ninitial: {noise: 0.01}\nfem: {laplacian: intrinsic-delaunay}\ntime: {step: 0.002, end: 0.01}\noutput: {every: 0.01, frames: false}\n');
    const out = temp.path('idt-run');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    expect(JSON.parse(readFileSync(join(out, 'record.json'), 'utf8')).resolved.fem).toEqual({ laplacian: 'intrinsic-delaunay', flips: 0 });
    const m = JSON.parse((await run('modes', 'sphere', '--vertices', '500', '-n', '4', '--laplacian', 'intrinsic-delaunay', '--json')).out);
    expect(m.laplacian).toBe('intrinsic-delaunay');
    expect(m.eigenvalues[1]).toBeCloseTo(2, 1);
    const growing = temp.write('idt-growing.yaml', 'mesh: {shape: sphere, vertices: 500}\nkinetics: {model: schnakenberg}\nfem: {laplacian: intrinsic-delaunay}\ntime: {end: 1}\ngrowth: {law: uniform, rate: 0.1}\n');
    const g = await run('run', growing, '--check');
    expect(g.code).toBe(1);
    expect(g.err).toMatch(/fem\.laplacian: intrinsic-delaunay is for fixed surfaces/);
  }, 60_000);
});
