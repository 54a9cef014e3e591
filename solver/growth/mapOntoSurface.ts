import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';
import { applyAffine, bestAlignment, cofactor, IDENTITY_MAP, inverseAffine, type AffineMap, type Alignment } from './globalAlignment.ts';
import { LANDMARK_WEIGHT, SurfaceCorrespondences } from './surfaceCorrespondences.ts';
import { REGISTRATION_ROUNDS, REGISTRATION_STIFFNESS_LENGTHS, smoothRegistration } from './smoothRegistration.ts';
import { settleOnSurface } from './settleOnSurface.ts';
import { weightedCentroid } from '../mesh/weightedCentroid.ts';

export type { Alignment } from './globalAlignment.ts';

/** A point on the source surface (a triangle's corners and barycentric weights) and where it must land on the target. */
export interface StageLandmark {
  corners: [number, number, number];
  weights: [number, number, number];
  target: [number, number, number];
}

export interface SurfaceMapOptions {
  /** the global map fitted first (default affine: anisotropic stretch is taken out before the smooth part) */
  alignment?: Alignment;
  /** points pinned to points of the target */
  landmarks?: readonly StageLandmark[];
  /** false: closest points after the global alignment only (the old map, for comparison) */
  nonRigid?: boolean;
  /** called after each registration round */
  onProgress?(done: number, of: number): void;
}

export interface SurfaceMap {
  /** the source's vertices placed on the target surface, in the source's order */
  positions: Float64Array;
  /** source triangles the map turns over against the target's orientation there, and those it shrinks below 1/1000 of their area */
  folded: number[];
  collapsed: number[];
  /** source triangles whose corners land on the target but whose middle does not: they span a gap of it (a hole, a cleft) */
  bridging: number[];
  /** the global map found first */
  transform: AffineMap;
  /** largest distance a vertex moved in the final projection onto the target (how far the smooth registration ended from it) */
  maxDistance: number;
  /** vertices moved again (to their neighbours' mean, then onto the target) to undo folds of the final projection */
  relaxed: number;
  /** each landmark's distance from its target point after the map */
  landmarkResiduals: number[];
}

export { REGISTRATION_STIFFNESS_LENGTHS } from './smoothRegistration.ts';
/** Global alignment rounds (iterative closest points). */
export const ALIGNMENT_ROUNDS = 30;
/** Points of each surface the global alignment uses (a spread-out sample: plenty for 12 numbers). */
const ALIGNMENT_SAMPLES = 4000;

/**
 * Carry a surface onto another with different connectivity (a later stage of
 * a limb bud imaged separately, say) so that the map follows the tissue:
 *
 * 1. a global map (affine by default; rigid or similarity on request) by
 *    iterative closest points taken both ways (SurfaceCorrespondences), so
 *    anisotropic stretch is taken out;
 * 2. a smooth non-rigid registration with its membrane stiffness lowered in
 *    steps, as in non-rigid ICP (smoothRegistration);
 * 3. every vertex onto the target, what turns over there untangled
 *    (settleOnSurface). What still folds, collapses or spans a gap is listed,
 *    so the caller can refuse the map.
 */
export function mapOntoSurface(source: Mesh, target: Mesh, options: SurfaceMapOptions | Alignment = {}): SurfaceMap {
  const opts: SurfaceMapOptions = typeof options === 'string' ? { alignment: options } : options;
  const alignment = opts.alignment ?? 'affine';
  const landmarks = opts.landmarks ?? [];
  const corr = new SurfaceCorrespondences(source, target);
  const totalRounds = (alignment === 'none' ? 0 : 1) + (opts.nonRigid === false ? 0 : REGISTRATION_STIFFNESS_LENGTHS.length * REGISTRATION_ROUNDS);
  let roundsDone = 0;
  const progress = () => opts.onProgress?.(++roundsDone, totalRounds);

  // 1. global alignment, on a sample of both surfaces (the source's search structure built once, in its own frame)
  let transform: AffineMap = IDENTITY_MAP;
  const x = Float64Array.from(source.positions);
  if (alignment !== 'none') {
    transform = globalAlignment(corr, alignment, landmarks);
    applyAffine(transform, source.positions, x);
    corr.forget();
    progress();
  }
  // 2. smooth non-rigid registration, stiffness lowered in steps
  if (opts.nonRigid !== false) smoothRegistration(x, corr, landmarks, progress);
  // 3. onto the target, then untangle what turned over
  const { maxDistance, folded, collapsed, bridging, relaxed } = settleOnSurface(x, corr);
  const landmarkResiduals = landmarks.map((l) => Math.hypot(...[0, 1, 2].map((d) => pointOn(x, l, d) - l.target[d])));
  return { positions: x, folded, collapsed, bridging, transform, maxDistance, relaxed, landmarkResiduals };
}

/**
 * The global map of a class by iterative closest points taken both ways, on samples of both surfaces,
 * starting from matching centroids and sizes (or from the landmarks, when two or more are given):
 * similarity rounds first while far off, then the class asked for.
 */
function globalAlignment(corr: SurfaceCorrespondences, alignment: Exclude<Alignment, 'none'>, landmarks: readonly StageLandmark[]): AffineMap {
  const { source, target, wSource, wTarget, closest, closestWeight, backCorners, backWeights, backWeight } = corr;
  const n = source.positions.length / 3, m = target.positions.length / 3;
  const sampleS = sample(n, ALIGNMENT_SAMPLES), sampleT = sample(m, ALIGNMENT_SAMPLES);
  const wS = restricted(wSource, sampleS), wT = restricted(wTarget, sampleT);
  const onSource = new SurfaceProjector(source);
  const sourceNormals = vertexNormals(source);
  const cs = weightedCentroid(source.positions, wSource), ct = weightedCentroid(target.positions, wTarget);
  const s0 = alignment === 'rigid' ? 1 : Math.sqrt(meanSquareDistance(target.positions, ct, wTarget) / meanSquareDistance(source.positions, cs, wSource));
  let transform: AffineMap = { matrix: [s0, 0, 0, 0, s0, 0, 0, 0, s0], shift: [ct[0] - s0 * cs[0], ct[1] - s0 * cs[1], ct[2] - s0 * cs[2]] };
  if (landmarks.length >= 2) {
    // landmarks and the centroids fix the turn that closest points alone find slowly, or not at all on a symmetric shape
    const k = landmarks.length + 1;
    const p = new Float64Array(3 * k), q = new Float64Array(3 * k), w = new Float64Array(k).fill(1);
    landmarks.forEach((l, r) => { for (let d = 0; d < 3; d++) { p[3 * r + d] = pointOn(source.positions, l, d); q[3 * r + d] = l.target[d]; } });
    p.set(cs, 3 * landmarks.length);
    q.set(ct, 3 * landmarks.length);
    transform = bestAlignment(p, q, w, alignment === 'rigid' ? 'rigid' : 'similarity');
  }
  const x = new Float64Array(3 * n);
  const pairs = sampleS.length + sampleT.length + landmarks.length;
  const p = new Float64Array(3 * pairs), q = new Float64Array(3 * pairs), w = new Float64Array(pairs);
  const size = Math.sqrt(meanSquareDistance(target.positions, ct, wTarget));
  for (let round = 0; round < ALIGNMENT_ROUNDS; round++) {
    applyAffine(transform, source.positions, x);
    corr.sourceToTarget(x, sampleS, wS);
    corr.targetToSource(onSource, source.positions, sourceNormals, sampleT, wT, inverseAffine(transform), cofactor(transform.matrix));
    // pairs in the source's own coordinates: source vertex → its target point; source point → target vertex; landmarks
    let r = 0;
    for (const i of sampleS) {
      for (let d = 0; d < 3; d++) { p[3 * r + d] = source.positions[3 * i + d]; q[3 * r + d] = closest[3 * i + d]; }
      w[r++] = closestWeight[i];
    }
    for (const j of sampleT) {
      for (let d = 0; d < 3; d++) {
        p[3 * r + d] = backWeights[3 * j] * source.positions[3 * backCorners[3 * j] + d] + backWeights[3 * j + 1] * source.positions[3 * backCorners[3 * j + 1] + d] + backWeights[3 * j + 2] * source.positions[3 * backCorners[3 * j + 2] + d];
        q[3 * r + d] = target.positions[3 * j + d];
      }
      w[r++] = backWeight[j];
    }
    for (const l of landmarks) {
      for (let d = 0; d < 3; d++) { p[3 * r + d] = pointOn(source.positions, l, d); q[3 * r + d] = l.target[d]; }
      w[r++] = LANDMARK_WEIGHT;
    }
    const kind = alignment === 'affine' && round < ALIGNMENT_ROUNDS / 3 ? 'similarity' : alignment;
    const next = bestAlignment(p, q, w, kind);
    const change = Math.max(...next.matrix.map((v, i) => Math.abs(v - transform.matrix[i])), ...next.shift.map((v, i) => Math.abs(v - transform.shift[i])));
    transform = next;
    if (round > ALIGNMENT_ROUNDS / 3 && change < 1e-7 * size) break;
  }
  return transform;
}

/** Place points given on a surface (the surface's nearest point to each): its triangle's corners and weights, and how far it was. */
export function locateOnSurface(surface: Mesh, points: readonly (readonly number[])[]): { corners: [number, number, number]; weights: [number, number, number]; distance: number }[] {
  if (points.length === 0) return [];
  const projector = new SurfaceProjector(surface);
  return points.map((point) => {
    projector.project(Float64Array.from(point), 0);
    return { corners: Array.from(projector.corners) as [number, number, number], weights: Array.from(projector.weights) as [number, number, number], distance: projector.distance };
  });
}

/** Coordinate d of a landmark's point on positions x. */
function pointOn(x: Float64Array, l: StageLandmark, d: number): number {
  return l.weights[0] * x[3 * l.corners[0] + d] + l.weights[1] * x[3 * l.corners[1] + d] + l.weights[2] * x[3 * l.corners[2] + d];
}

/** Every k-th index, at most about `count` of them. */
function sample(n: number, count: number): Uint32Array {
  const stride = Math.max(1, Math.floor(n / count));
  const out = new Uint32Array(Math.ceil(n / stride));
  for (let i = 0, r = 0; i < n; i += stride) out[r++] = i;
  return out;
}

/** Weights of the listed indices, scaled to sum to 1 over them (others 0). */
function restricted(w: Float64Array, list: Uint32Array): Float64Array {
  const out = new Float64Array(w.length);
  let s = 0;
  for (const i of list) s += w[i];
  for (const i of list) out[i] = w[i] / s;
  return out;
}

/** Σ wᵢ|xᵢ − c|² (weights summing to 1: the mean square distance from c). */
function meanSquareDistance(x: Float64Array, c: number[], w: Float64Array): number {
  let s = 0;
  for (let i = 0; i < w.length; i++) s += w[i] * ((x[3 * i] - c[0]) ** 2 + (x[3 * i + 1] - c[1]) ** 2 + (x[3 * i + 2] - c[2]) ** 2);
  return s;
}
