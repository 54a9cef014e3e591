import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { BoundaryProjector } from '../mesh/boundaryProjector.ts';
import { meshTopology } from '../mesh/meshTopology.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { triangleAreas } from '../mesh/triangleAreas.ts';
import { vertexSparsityPattern } from '../fem/vertexSparsityPattern.ts';
import { SparseCholesky } from '../linalg/SparseCholesky.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { applyAffine, bestAlignment, determinant3, IDENTITY_MAP, type AffineMap, type Alignment } from './globalAlignment.ts';

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

/** Membrane stiffness of the smooth registration, lowered in steps: the length over which a displacement is smoothed, as a fraction of √(area). */
export const REGISTRATION_STIFFNESS_LENGTHS = [0.3, 0.15, 0.08, 0.04, 0.02] as const;
/** Registration rounds (closest points, then a solve) at each stiffness. */
export const REGISTRATION_ROUNDS = 2;
/** Global alignment rounds (iterative closest points). */
export const ALIGNMENT_ROUNDS = 30;
/** Points of each surface the global alignment uses (a spread-out sample: plenty for 12 numbers). */
const ALIGNMENT_SAMPLES = 4000;
/** Correspondences whose normals differ by more than this (cos 60°) are dropped. */
const NORMAL_AGREEMENT = 0.5;
/** Weight of a boundary vertex's correspondence, in units of its share of the area. */
const BOUNDARY_WEIGHT = 20;
/** Weight of one landmark, against the surface terms (which sum to 1 each way). */
const LANDMARK_WEIGHT = 0.05;
/** A triangle whose centre lies farther from the target than this fraction of its longest edge spans a gap (a chord's sagitta is far smaller). */
const BRIDGE_FRACTION = 0.25;
/** Rounds of relaxation that may follow the final projection to undo folds. */
const UNFOLD_ROUNDS = 40;

/**
 * Carry a surface onto another with different connectivity (a later stage of
 * a limb bud imaged separately, say) so that the map follows the tissue:
 *
 * 1. a global map (affine by default; rigid or similarity on request) by
 *    iterative closest points taken both ways (source vertices to the target
 *    surface, target vertices to the source surface), so anisotropic stretch
 *    is taken out;
 * 2. a smooth non-rigid registration: the positions X minimise
 *    Σ wᵢ|xᵢ − cᵢ|² + Σ vⱼ|x(ξⱼ) − yⱼ|² + Σ λ|x(ℓ) − L|² + α Σ_edges |(xₐ − x_b) − (x⁰ₐ − x⁰_b)|²
 *    (closest points both ways, landmarks, and a membrane stiffness on the
 *    displacement from the aligned source), with α lowered in steps as in
 *    non-rigid ICP (Amberg, Romdhani & Vetter, CVPR 2007, there with per-vertex
 *    affine maps); each round is one sparse Cholesky solve on the mesh's
 *    pattern. Correspondences whose normals disagree, and interior points that
 *    land on a boundary, are dropped; boundary vertices follow the target's
 *    boundary.
 * 3. every vertex moved to its closest point on the target (boundary vertices
 *    on its boundary; SurfaceProjector's bounding-volume hierarchy), and any triangle that turns over there
 *    untangled by moving its corners to their neighbours' mean and back onto
 *    the target. What still folds or collapses is listed, so the caller can
 *    refuse the map.
 */
export function mapOntoSurface(source: Mesh, target: Mesh, options: SurfaceMapOptions | Alignment = {}): SurfaceMap {
  const opts: SurfaceMapOptions = typeof options === 'string' ? { alignment: options } : options;
  const alignment = opts.alignment ?? 'affine';
  const landmarks = opts.landmarks ?? [];
  const n = source.positions.length / 3;
  const tri = source.triangles;
  const onTarget = new SurfaceProjector(target);
  const targetEdge = new BoundaryProjector(target);
  const sourceEdge = new BoundaryProjector(source);
  const targetNormals = vertexNormals(target);
  const wSource = normalised(lumpedMass(source));
  const wTarget = normalised(lumpedMass(target));
  const m = target.positions.length / 3;
  const totalRounds = (alignment === 'none' ? 0 : 1) + (opts.nonRigid === false ? 0 : REGISTRATION_STIFFNESS_LENGTHS.length * REGISTRATION_ROUNDS);
  let roundsDone = 0;

  // correspondences of the current positions x: the target point of each listed source vertex (weight 0 when dropped)
  const closest = new Float64Array(3 * n);
  const closestWeight = new Float64Array(n);
  const closestDistance = new Float64Array(n).fill(Infinity);
  const xNormals = new Float64Array(3 * n);
  const sourceToTarget = (x: Float64Array, list: Uint32Array, weights: Float64Array) => {
    vertexNormals({ positions: x, triangles: tri }, xNormals);
    for (const i of list) {
      // the last closest point bounds the new distance (triangle inequality), which prunes the search
      const near = closestDistance[i] === Infinity ? Infinity : Math.hypot(x[3 * i] - closest[3 * i], x[3 * i + 1] - closest[3 * i + 1], x[3 * i + 2] - closest[3 * i + 2]) * (1 + 1e-9) + 1e-12;
      closest[3 * i] = x[3 * i]; closest[3 * i + 1] = x[3 * i + 1]; closest[3 * i + 2] = x[3 * i + 2];
      if (sourceEdge.onBoundary[i] && !targetEdge.empty) {
        // boundaries (a bud's open base) are curves the map must take onto each other: weighted up, or the
        // surfaces' many points would let the base slide off its counterpart
        targetEdge.project(closest, i);
        closestWeight[i] = BOUNDARY_WEIGHT * weights[i];
        continue;
      }
      onTarget.project(closest, i, near);
      closestDistance[i] = onTarget.distance;
      const k = onTarget.corners, w = onTarget.weights;
      if (onEdgeOf(targetEdge.onBoundary, k, w)) { closestWeight[i] = 0; continue; }
      const agree = agreement(targetNormals, k, w, xNormals, i);
      closestWeight[i] = agree < NORMAL_AGREEMENT ? 0 : weights[i];
    }
  };
  // the source point of each listed target vertex: corners and weights on the source (weight 0 when dropped).
  // onSource holds the source surface in some frame; toFrame takes a target point into it, and normalToTarget
  // (3×3) takes the surface's normals back (the cofactor matrix of the frame's map)
  const backCorners = new Uint32Array(3 * m);
  const backWeights = new Float64Array(3 * m);
  const backWeight = new Float64Array(m);
  let backKnown = false;
  const scratch = new Float64Array(3);
  const targetToSource = (onSource: SurfaceProjector, frame: Float64Array, normals: Float64Array, list: Uint32Array, weights: Float64Array, toFrame?: AffineMap, normalToTarget?: number[]) => {
    const y = target.positions;
    for (const j of list) {
      if (targetEdge.onBoundary[j] && !sourceEdge.empty) { backWeight[j] = 0; continue; } // the source's boundary is pulled onto this one from the other side
      scratch[0] = y[3 * j]; scratch[1] = y[3 * j + 1]; scratch[2] = y[3 * j + 2];
      if (toFrame) applyAffine(toFrame, scratch, scratch);
      let near = Infinity;
      if (backKnown) {
        // the same surface point as last time bounds the new distance
        let d2 = 0;
        for (let d = 0; d < 3; d++) d2 += (scratch[d] - backWeights[3 * j] * frame[3 * backCorners[3 * j] + d] - backWeights[3 * j + 1] * frame[3 * backCorners[3 * j + 1] + d] - backWeights[3 * j + 2] * frame[3 * backCorners[3 * j + 2] + d]) ** 2;
        near = Math.sqrt(d2) * (1 + 1e-9) + 1e-12;
      }
      onSource.project(scratch, 0, near);
      const k = onSource.corners, w = onSource.weights;
      backCorners.set(k, 3 * j);
      backWeights.set(w, 3 * j);
      backWeight[j] = 0;
      if (onEdgeOf(sourceEdge.onBoundary, k, w)) continue;
      let nx = w[0] * normals[3 * k[0]] + w[1] * normals[3 * k[1]] + w[2] * normals[3 * k[2]];
      let ny = w[0] * normals[3 * k[0] + 1] + w[1] * normals[3 * k[1] + 1] + w[2] * normals[3 * k[2] + 1];
      let nz = w[0] * normals[3 * k[0] + 2] + w[1] * normals[3 * k[1] + 2] + w[2] * normals[3 * k[2] + 2];
      if (normalToTarget) {
        const C = normalToTarget;
        [nx, ny, nz] = [C[0] * nx + C[1] * ny + C[2] * nz, C[3] * nx + C[4] * ny + C[5] * nz, C[6] * nx + C[7] * ny + C[8] * nz];
      }
      const agree = (nx * targetNormals[3 * j] + ny * targetNormals[3 * j + 1] + nz * targetNormals[3 * j + 2]) / (Math.hypot(nx, ny, nz) || 1);
      if (agree >= NORMAL_AGREEMENT) backWeight[j] = weights[j];
    }
    backKnown = true;
  };
  const progress = () => opts.onProgress?.(++roundsDone, totalRounds);
  const allSource = iota(n), allTarget = iota(m);

  // 1. global alignment, on a sample of both surfaces (the source's search structure built once, in its own frame)
  let transform: AffineMap = IDENTITY_MAP;
  const x = Float64Array.from(source.positions);
  if (alignment !== 'none') {
    const sampleS = sample(n, ALIGNMENT_SAMPLES), sampleT = sample(m, ALIGNMENT_SAMPLES);
    const wS = restricted(wSource, sampleS), wT = restricted(wTarget, sampleT);
    const onSource = new SurfaceProjector(source);
    const sourceNormals = vertexNormals(source);
    // start from matching centroids and sizes
    const cs = centroid(source.positions, wSource), ct = centroid(target.positions, wTarget);
    const s0 = alignment === 'rigid' ? 1 : Math.sqrt(spread(target.positions, ct, wTarget) / spread(source.positions, cs, wSource));
    transform = { matrix: [s0, 0, 0, 0, s0, 0, 0, 0, s0], shift: [ct[0] - s0 * cs[0], ct[1] - s0 * cs[1], ct[2] - s0 * cs[2]] };
    if (landmarks.length >= 2) {
      // landmarks and the centroids fix the turn that closest points alone find slowly, or not at all on a symmetric shape
      const k = landmarks.length + 1;
      const p = new Float64Array(3 * k), q = new Float64Array(3 * k), w = new Float64Array(k).fill(1);
      landmarks.forEach((l, r) => { for (let d = 0; d < 3; d++) { p[3 * r + d] = pointOn(source.positions, l, d); q[3 * r + d] = l.target[d]; } });
      p.set(cs, 3 * landmarks.length);
      q.set(ct, 3 * landmarks.length);
      transform = bestAlignment(p, q, w, alignment === 'rigid' ? 'rigid' : 'similarity');
    }
    const pairs = sampleS.length + sampleT.length + landmarks.length;
    const p = new Float64Array(3 * pairs), q = new Float64Array(3 * pairs), w = new Float64Array(pairs);
    for (let round = 0; round < ALIGNMENT_ROUNDS; round++) {
      applyAffine(transform, source.positions, x);
      sourceToTarget(x, sampleS, wS);
      targetToSource(onSource, source.positions, sourceNormals, sampleT, wT, inverseAffine(transform), cofactor(transform.matrix));
      // pairs in the source's own coordinates: source vertex → its target point; source point → target vertex; landmarks
      let r = 0;
      for (const i of sampleS) {
        for (let d = 0; d < 3; d++) { p[3 * r + d] = source.positions[3 * i + d]; q[3 * r + d] = closest[3 * i + d]; }
        w[r++] = closestWeight[i];
      }
      for (const j of sampleT) {
        at(source.positions, backCorners, backWeights, j, p, r);
        for (let d = 0; d < 3; d++) q[3 * r + d] = target.positions[3 * j + d];
        w[r++] = backWeight[j];
      }
      for (const l of landmarks) {
        for (let d = 0; d < 3; d++) { p[3 * r + d] = pointOn(source.positions, l, d); q[3 * r + d] = l.target[d]; }
        w[r++] = LANDMARK_WEIGHT;
      }
      // similarity first while far off; the full class once close
      const kind = alignment === 'affine' && round < ALIGNMENT_ROUNDS / 3 ? 'similarity' : alignment;
      const next = bestAlignment(p, q, w, kind);
      const change = Math.max(...next.matrix.map((v, i) => Math.abs(v - transform.matrix[i])), ...next.shift.map((v, i) => Math.abs(v - transform.shift[i])));
      transform = next;
      if (round > ALIGNMENT_ROUNDS / 3 && change < 1e-7 * Math.sqrt(spread(target.positions, ct, wTarget))) break;
    }
    applyAffine(transform, source.positions, x);
    backKnown = false;
    closestDistance.fill(Infinity);
    progress();
  }

  // 2. smooth non-rigid registration, stiffness lowered in steps
  if (opts.nonRigid !== false) registerNonRigid();

  function registerNonRigid() {
    const x0 = Float64Array.from(x);
    const pattern = vertexSparsityPattern(source);
    const topo = meshTopology(source);
    const nnz = pattern.columns.length;
    const laplacian = new Float64Array(nnz);
    for (let e = 0; e < topo.edgeCount; e++) {
      const a = topo.edges[2 * e], b = topo.edges[2 * e + 1];
      laplacian[pattern.edgeSlots[2 * e]] = -1;
      laplacian[pattern.edgeSlots[2 * e + 1]] = -1;
      laplacian[pattern.diagonalSlots[a]] += 1;
      laplacian[pattern.diagonalSlots[b]] += 1;
    }
    const a: CsrMatrix = { rows: n, cols: n, rowOffsets: pattern.rowOffsets, columns: pattern.columns, values: new Float64Array(nnz) };
    const lx0 = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      for (let s = pattern.rowOffsets[i]; s < pattern.rowOffsets[i + 1]; s++) {
        const j = pattern.columns[s], v = laplacian[s];
        lx0[3 * i] += v * x0[3 * j]; lx0[3 * i + 1] += v * x0[3 * j + 1]; lx0[3 * i + 2] += v * x0[3 * j + 2];
      }
    }
    const rhs = new Float64Array(3 * n), work = new Float64Array(3 * n);
    const slot = (i: number, j: number) => {
      if (i === j) return pattern.diagonalSlots[i];
      let lo = pattern.rowOffsets[i], hi = pattern.rowOffsets[i + 1] - 1;
      while (lo <= hi) {
        const mid = (lo + hi) >> 1, c = pattern.columns[mid];
        if (c === j) return mid;
        if (c < j) lo = mid + 1; else hi = mid - 1;
      }
      return -1;
    };
    const addPoint = (k: ArrayLike<number>, w: ArrayLike<number>, weight: number, y0: number, y1: number, y2: number) => {
      for (let r = 0; r < 3; r++) {
        const wr = weight * w[r];
        if (wr === 0) continue;
        rhs[3 * k[r]] += wr * y0; rhs[3 * k[r] + 1] += wr * y1; rhs[3 * k[r] + 2] += wr * y2;
        for (let c = 0; c < 3; c++) {
          const s = slot(k[r], k[c]);
          if (s >= 0) a.values[s] += wr * w[c];
        }
      }
    };
    let chol: SparseCholesky | undefined;
    const onMoving = new SurfaceProjector({ positions: x, triangles: tri });
    for (const length of REGISTRATION_STIFFNESS_LENGTHS) {
      const alpha = (length * length) / 1.73; // Σ_edges |Δd|² ≈ 1.73 ∫|∇d|² on a regular mesh; the data terms sum to 1 over the area
      for (let round = 0; round < REGISTRATION_ROUNDS; round++) {
        sourceToTarget(x, allSource, wSource);
        onMoving.refit(x);
        targetToSource(onMoving, x, xNormals, allTarget, wTarget);
        for (let s = 0; s < nnz; s++) a.values[s] = alpha * laplacian[s];
        for (let i = 0; i < 3 * n; i++) rhs[i] = alpha * lx0[i];
        for (let i = 0; i < n; i++) {
          const w = closestWeight[i];
          a.values[pattern.diagonalSlots[i]] += w + 1e-12;
          rhs[3 * i] += w * closest[3 * i]; rhs[3 * i + 1] += w * closest[3 * i + 1]; rhs[3 * i + 2] += w * closest[3 * i + 2];
        }
        const y = target.positions;
        for (let j = 0; j < m; j++) if (backWeight[j] > 0) addPoint(backCorners.subarray(3 * j, 3 * j + 3), backWeights.subarray(3 * j, 3 * j + 3), backWeight[j], y[3 * j], y[3 * j + 1], y[3 * j + 2]);
        for (const l of landmarks) addPoint(l.corners, l.weights, LANDMARK_WEIGHT, l.target[0], l.target[1], l.target[2]);
        chol = chol ? chol.refactor(a) : new SparseCholesky(a);
        chol.solveMany(rhs, 3, x, work);
        progress();
      }
    }
  }

  // 3. onto the target, then untangle what turned over
  const registered = Float64Array.from(x);
  let maxDistance = 0;
  for (let i = 0; i < n; i++) {
    if (sourceEdge.onBoundary[i] && !targetEdge.empty) targetEdge.project(x, i);
    else onTarget.project(x, i, closestDistance[i] === Infinity ? Infinity : Math.hypot(x[3 * i] - closest[3 * i], x[3 * i + 1] - closest[3 * i + 1], x[3 * i + 2] - closest[3 * i + 2]) * (1 + 1e-9) + 1e-12);
    maxDistance = Math.max(maxDistance, sourceEdge.onBoundary[i] && !targetEdge.empty ? targetEdge.distance : onTarget.distance);
  }
  const restArea = triangleAreas({ positions: registered, triangles: tri });
  const bad = (t: number): 0 | 1 | 2 | 3 => {
    const A = tri[3 * t], B = tri[3 * t + 1], C = tri[3 * t + 2];
    const ux = x[3 * B] - x[3 * A], uy = x[3 * B + 1] - x[3 * A + 1], uz = x[3 * B + 2] - x[3 * A + 2];
    const vx = x[3 * C] - x[3 * A], vy = x[3 * C + 1] - x[3 * A + 1], vz = x[3 * C + 2] - x[3 * A + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    for (let d = 0; d < 3; d++) scratch[d] = (x[3 * A + d] + x[3 * B + d] + x[3 * C + d]) / 3;
    // the corner A lies on the target: the centre is no farther from it than from A
    onTarget.project(scratch, 0, Math.hypot(scratch[0] - x[3 * A], scratch[1] - x[3 * A + 1], scratch[2] - x[3 * A + 2]) * (1 + 1e-9) + 1e-12);
    const k = onTarget.corners, w = onTarget.weights;
    let dot = 0;
    for (let d = 0; d < 3; d++) dot += (d === 0 ? cx : d === 1 ? cy : cz) * (w[0] * targetNormals[3 * k[0] + d] + w[1] * targetNormals[3 * k[1] + d] + w[2] * targetNormals[3 * k[2] + d]);
    if (dot <= 0) return 1;
    if (0.5 * Math.hypot(cx, cy, cz) < 1e-3 * restArea[t]) return 2;
    // a triangle whose corners lie on the target but whose middle does not spans a gap (a hole, a cleft)
    const longest = Math.sqrt(Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, (vx - ux) ** 2 + (vy - uy) ** 2 + (vz - uz) ** 2));
    return onTarget.distance > BRIDGE_FRACTION * longest ? 3 : 0;
  };
  const nF = tri.length / 3;
  let badTriangles: number[] = [];
  for (let t = 0; t < nF; t++) if (bad(t)) badTriangles.push(t);
  const topo = meshTopology(source);
  const moved = new Uint8Array(n);
  for (let round = 0; round < UNFOLD_ROUNDS && badTriangles.length > 0; round++) {
    // the corners of what is bad, widened by one ring every tenth round
    let region = new Set<number>();
    for (const t of badTriangles) for (let c = 0; c < 3; c++) region.add(tri[3 * t + c]);
    for (let ring = 0; ring < Math.floor(round / 10); ring++) {
      const wider = new Set(region);
      for (const v of region) for (let s = topo.vertexNeighbourOffsets[v]; s < topo.vertexNeighbourOffsets[v + 1]; s++) wider.add(topo.vertexNeighbours[s]);
      region = wider;
    }
    for (const v of region) {
      if (sourceEdge.onBoundary[v]) continue;
      let sx = 0, sy = 0, sz = 0;
      const s0 = topo.vertexNeighbourOffsets[v], s1 = topo.vertexNeighbourOffsets[v + 1];
      for (let s = s0; s < s1; s++) { const u = topo.vertexNeighbours[s]; sx += x[3 * u]; sy += x[3 * u + 1]; sz += x[3 * u + 2]; }
      x[3 * v] = sx / (s1 - s0); x[3 * v + 1] = sy / (s1 - s0); x[3 * v + 2] = sz / (s1 - s0);
      onTarget.project(x, v);
      moved[v] = 1;
    }
    const check = new Set<number>();
    for (const v of region) for (let s = topo.vertexTriangleOffsets[v]; s < topo.vertexTriangleOffsets[v + 1]; s++) check.add(topo.vertexTriangles[s]);
    const still = new Set(badTriangles.filter((t) => !check.has(t)));
    for (const t of check) if (bad(t)) still.add(t);
    badTriangles = [...still];
  }
  const folded: number[] = [], collapsed: number[] = [], bridging: number[] = [];
  for (const t of badTriangles.sort((p, q) => p - q)) [folded, collapsed, bridging][bad(t) - 1]?.push(t);
  const landmarkResiduals = landmarks.map((l) => {
    let d2 = 0;
    for (let d = 0; d < 3; d++) d2 += (pointOn(x, l, d) - l.target[d]) ** 2;
    return Math.sqrt(d2);
  });
  let relaxed = 0;
  for (let i = 0; i < n; i++) relaxed += moved[i];
  return { positions: x, folded, collapsed, bridging, transform, maxDistance, relaxed, landmarkResiduals };
}

/** Place a point given on a surface (nearest point of the surface to it): its triangle's corners and weights. */
export function locateOnSurface(surface: Mesh, point: readonly number[]): { corners: [number, number, number]; weights: [number, number, number]; distance: number } {
  const projector = new SurfaceProjector(surface);
  const p = Float64Array.from(point);
  projector.project(p, 0);
  return { corners: Array.from(projector.corners) as [number, number, number], weights: Array.from(projector.weights) as [number, number, number], distance: projector.distance };
}

/** Coordinate d of a landmark's point on positions x. */
function pointOn(x: Float64Array, l: StageLandmark, d: number): number {
  return l.weights[0] * x[3 * l.corners[0] + d] + l.weights[1] * x[3 * l.corners[1] + d] + l.weights[2] * x[3 * l.corners[2] + d];
}

/** How far a source vertex's normal and the target's normal at its closest point agree (cosine). */
function agreement(targetNormals: Float64Array, k: ArrayLike<number>, w: ArrayLike<number>, normals: Float64Array, i: number): number {
  let dot = 0, len = 0;
  for (let d = 0; d < 3; d++) {
    const t = w[0] * targetNormals[3 * k[0] + d] + w[1] * targetNormals[3 * k[1] + d] + w[2] * targetNormals[3 * k[2] + d];
    dot += t * normals[3 * i + d];
    len += t * t;
  }
  return dot / (Math.sqrt(len) || 1);
}

function iota(n: number): Uint32Array {
  const out = new Uint32Array(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
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

function inverseAffine(m: AffineMap): AffineMap {
  const C = cofactor(m.matrix), det = determinant3(m.matrix);
  // inverse = cofactorᵀ / det
  const matrix = [C[0], C[3], C[6], C[1], C[4], C[7], C[2], C[5], C[8]].map((v) => v / det);
  const t = m.shift;
  const shift = [0, 1, 2].map((r) => -(matrix[3 * r] * t[0] + matrix[3 * r + 1] * t[1] + matrix[3 * r + 2] * t[2])) as [number, number, number];
  return { matrix, shift };
}

/** The cofactor matrix of a 3×3 matrix: it maps normals under x ↦ Mx (det·M⁻ᵀ). */
function cofactor(M: readonly number[]): number[] {
  return [
    M[4] * M[8] - M[5] * M[7], M[5] * M[6] - M[3] * M[8], M[3] * M[7] - M[4] * M[6],
    M[2] * M[7] - M[1] * M[8], M[0] * M[8] - M[2] * M[6], M[1] * M[6] - M[0] * M[7],
    M[1] * M[5] - M[2] * M[4], M[2] * M[3] - M[0] * M[5], M[0] * M[4] - M[1] * M[3],
  ];
}

/** Whether a hit (corners k, weights w) lies on an edge whose two ends are both boundary vertices. */
function onEdgeOf(boundary: Uint8Array, k: ArrayLike<number>, w: ArrayLike<number>): boolean {
  for (let r = 0; r < 3; r++) {
    if (w[r] > 1e-6) continue;
    if (boundary[k[(r + 1) % 3]] && boundary[k[(r + 2) % 3]]) return true;
  }
  return false;
}

function at(x: Float64Array, corners: Uint32Array, weights: Float64Array, j: number, out: Float64Array, r: number): void {
  const a = corners[3 * j], b = corners[3 * j + 1], c = corners[3 * j + 2];
  const wa = weights[3 * j], wb = weights[3 * j + 1], wc = weights[3 * j + 2];
  for (let d = 0; d < 3; d++) out[3 * r + d] = wa * x[3 * a + d] + wb * x[3 * b + d] + wc * x[3 * c + d];
}

function normalised(w: Float64Array): Float64Array {
  let s = 0;
  for (let i = 0; i < w.length; i++) s += w[i];
  for (let i = 0; i < w.length; i++) w[i] /= s;
  return w;
}

function centroid(x: Float64Array, w: Float64Array): [number, number, number] {
  const c: [number, number, number] = [0, 0, 0];
  for (let i = 0; i < w.length; i++) for (let d = 0; d < 3; d++) c[d] += w[i] * x[3 * i + d];
  return c;
}

function spread(x: Float64Array, c: number[], w: Float64Array): number {
  let s = 0;
  for (let i = 0; i < w.length; i++) s += w[i] * ((x[3 * i] - c[0]) ** 2 + (x[3 * i + 1] - c[1]) ** 2 + (x[3 * i + 2] - c[2]) ** 2);
  return s;
}
