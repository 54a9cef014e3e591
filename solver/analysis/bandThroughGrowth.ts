import type { Mesh } from '../mesh/Mesh.ts';
import type { GrowthLaw } from '../growth/GrowthLaw.ts';
import { laplaceBeltramiEigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { modesToCoverBand } from './stabilityReport.ts';

/** One surface eigenvalue cluster followed through growth: when it enters and leaves the unstable band. */
export interface BandCrossing {
  /** first mode index of the cluster on the starting surface, and its size */
  index: number;
  multiplicity: number;
  /** the cluster's eigenvalue on the starting surface */
  eigenvalue0: number;
  /** first time its eigenvalue is inside the band (0: from the start), or null if never within the course */
  enters: number | null;
  /** first time after entering that it lies below the band's lower edge, or null */
  leaves: number | null;
}

export interface BandCourse {
  band: [number, number];
  end: number;
  /** sample times, and each followed cluster's eigenvalue at them */
  times: number[];
  clusters: (BandCrossing & { eigenvalues: number[] })[];
  /** 'similarity': eigenvalues scale as λ(0)/ρ(t)², crossings solved exactly; 'recomputed': eigenpairs of the grown surface at every sample */
  method: 'similarity' | 'recomputed';
  notes: string[];
}

export interface BandCourseOptions {
  /** surfaces sampled over the course where the growth is not a similarity (default 12) */
  samples?: number;
  /** most eigenpairs per surface (default 200) */
  maxModes?: number;
  /** called after each sampled surface (done, of) */
  onProgress?: (done: number, of: number) => void;
}

/** The first t in [t0, t1] where f crosses `level` (f(t0) and f(t1) on either side), by bisection. */
function crossing(f: (t: number) => number, level: number, t0: number, t1: number): number {
  let a = t0, b = t1;
  const above = f(a) > level;
  for (let k = 0; k < 100 && b - a > 1e-12 * Math.max(1, Math.abs(b)); k++) {
    const m = 0.5 * (a + b);
    if ((f(m) > level) === above) a = m;
    else b = m;
  }
  return 0.5 * (a + b);
}

/**
 * When each eigenvalue cluster of a growing surface enters and leaves the
 * unstable band [k²₁, k²₂] (fixed in k²: the kinetics do not change; the
 * surface's eigenvalues fall as it grows). For a similarity the eigenvalues
 * of the starting surface scale as λ(t) = λ(0)/ρ(t)², and the times solve
 * λ(0)/ρ(t)² = k²₂ (entry) and = k²₁ (exit) exactly; otherwise the surface is
 * grown by its law to `samples` times, its eigenpairs recomputed (lumped mass,
 * as the stepping uses) and the crossings interpolated linearly in time,
 * following the clusters of the starting surface by mode index.
 * The clusters followed are those that reach the band within the course.
 */
export function bandThroughGrowth(mesh: Mesh, law: GrowthLaw, band: [number, number], end: number, options: BandCourseOptions = {}): BandCourse {
  const notes: string[] = [];
  const maxModes = options.maxModes ?? 200;
  const n = mesh.positions.length / 3;
  const area0 = meshArea(mesh);
  let finalArea: number;
  let surfaces: Float64Array[] | undefined;
  const samples = Math.max(2, options.samples ?? 12);
  const times: number[] = [];
  if (law.similarity) {
    finalArea = area0 * Math.max(...Array.from({ length: 65 }, (_, k) => law.similarity!((end * k) / 64) ** 2));
  } else {
    // grow the surface through the course, in substeps (field laws integrate a velocity)
    surfaces = [Float64Array.from(mesh.positions)];
    let current: Mesh = { positions: Float64Array.from(mesh.positions), triangles: mesh.triangles };
    const sub = 8;
    for (let k = 1; k <= samples; k++) {
      for (let s = 0; s < sub; s++) {
        const t0 = (end * ((k - 1) * sub + s)) / (samples * sub), t1 = (end * ((k - 1) * sub + s + 1)) / (samples * sub);
        const out = new Float64Array(current.positions.length);
        law.advance(current, t0, t1, out);
        current = { positions: out, triangles: mesh.triangles };
      }
      surfaces.push(current.positions);
    }
    finalArea = Math.max(...surfaces.map((p) => meshArea({ positions: p, triangles: mesh.triangles })));
  }
  const wanted = modesToCoverBand(finalArea, band) ?? 20;
  const count = Math.min(wanted, maxModes, n - 1);
  if (count < wanted) notes.push(`covering the band on the grown surface takes about ${wanted} modes; ${count} were computed${count === n - 1 ? ' (all this mesh has)' : ''}: clusters beyond them are not followed`);
  const eig0 = laplaceBeltramiEigenpairs(mesh, { count, mass: 'lumped' });
  options.onProgress?.(1, surfaces ? samples + 1 : 1);
  const clusters0 = eig0.clusters.filter((c) => !(c.first === 0 && c.mean < 1e-9 * (eig0.values[eig0.values.length - 1] || 1)));
  let follow: BandCourse['clusters'];
  if (law.similarity) {
    const rho = law.similarity;
    const steps = 64;
    for (let k = 0; k <= steps; k++) times.push((end * k) / steps);
    follow = clusters0.map((c) => {
      const lambda = (t: number) => c.mean / rho(t) ** 2;
      return { index: c.first, multiplicity: c.size, eigenvalue0: c.mean, eigenvalues: times.map(lambda), ...crossings(times, times.map(lambda), band, lambda) };
    });
  } else {
    for (let k = 0; k <= samples; k++) times.push((end * k) / samples);
    const values: Float64Array[] = [eig0.values];
    for (let k = 1; k <= samples; k++) {
      values.push(laplaceBeltramiEigenpairs({ positions: surfaces![k], triangles: mesh.triangles }, { count, mass: 'lumped' }).values);
      options.onProgress?.(k + 1, samples + 1);
    }
    follow = clusters0.map((c) => {
      const mean = values.map((v) => {
        let s = 0;
        for (let j = c.first; j < c.first + c.size; j++) s += v[j];
        return s / c.size;
      });
      return { index: c.first, multiplicity: c.size, eigenvalue0: c.mean, eigenvalues: mean, ...crossings(times, mean, band) };
    });
    notes.push(`eigenvalues recomputed on the surface grown to ${samples} times (the growth is not a similarity); crossings interpolated between them, to within ${(end / samples).toPrecision(3)} in time at worst`);
  }
  return { band, end, times, clusters: follow.filter((c) => c.enters !== null || c.eigenvalues.some((l) => l >= band[0] && l <= band[1])), method: law.similarity ? 'similarity' : 'recomputed', notes };
}

/** Entry (first time in the band) and exit (first time below it afterwards), exactly through `exact` where given, else linearly between samples. */
function crossings(times: readonly number[], values: readonly number[], band: [number, number], exact?: (t: number) => number): { enters: number | null; leaves: number | null } {
  const inside = (v: number) => v >= band[0] && v <= band[1];
  const at = (k: number, level: number) => {
    if (exact) return crossing(exact, level, times[k - 1], times[k]);
    const [v0, v1] = [values[k - 1], values[k]];
    return times[k - 1] + ((times[k] - times[k - 1]) * (level - v0)) / (v1 - v0);
  };
  let enters: number | null = inside(values[0]) ? 0 : null;
  let leaves: number | null = null;
  for (let k = 1; k < times.length; k++) {
    if (enters === null) {
      if (values[k - 1] > band[1] && values[k] <= band[1]) enters = at(k, band[1]);
      else if (values[k - 1] < band[0] && values[k] >= band[0]) enters = at(k, band[0]);
      else continue;
    }
    if (leaves === null && values[k] < band[0] && values[k - 1] >= band[0]) { leaves = at(k, band[0]); break; }
  }
  return { enters, leaves };
}
