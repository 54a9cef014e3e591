import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { BoundaryProjector } from '../mesh/boundaryProjector.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { applyAffine, type AffineMap } from './globalAlignment.ts';

/** Correspondences whose normals differ by more than this (cos 60°) are dropped. */
const NORMAL_AGREEMENT = 0.5;
/** Weight of a boundary vertex's correspondence, in units of its share of the area. */
const BOUNDARY_WEIGHT = 20;
/** Weight of one landmark, against the surface terms (which sum to 1 each way). */
export const LANDMARK_WEIGHT = 0.05;

/**
 * Closest-point correspondences between a moving source surface and a fixed
 * target, both ways: each source vertex's closest point on the target
 * (`closest`, `closestWeight`) and each target vertex's closest point on the
 * source as corners and barycentric weights (`backCorners`, `backWeights`,
 * `backWeight`). Weights are shares of area (each way summing to 1); a pair is
 * dropped (weight 0) when the normals there disagree by more than 60°, or when
 * an interior point lands on a boundary; boundary vertices go to the other
 * surface's boundary, weighted up so an open base cannot slide. Each search
 * is pruned by the distance the last pair proves the point to lie within.
 */
export class SurfaceCorrespondences {
  readonly onTarget: SurfaceProjector;
  readonly targetEdge: BoundaryProjector;
  readonly sourceEdge: BoundaryProjector;
  readonly targetNormals: Float64Array;
  /** each vertex's share of the area (lumped mass over the total), source and target */
  readonly wSource: Float64Array;
  readonly wTarget: Float64Array;
  readonly closest: Float64Array;
  readonly closestWeight: Float64Array;
  readonly closestDistance: Float64Array;
  /** the source's vertex normals at the positions last matched */
  readonly xNormals: Float64Array;
  readonly backCorners: Uint32Array;
  readonly backWeights: Float64Array;
  readonly backWeight: Float64Array;
  private backKnown = false;
  private readonly scratch = new Float64Array(3);

  constructor(readonly source: Mesh, readonly target: Mesh) {
    const n = source.positions.length / 3, m = target.positions.length / 3;
    this.onTarget = new SurfaceProjector(target);
    this.targetEdge = new BoundaryProjector(target);
    this.sourceEdge = new BoundaryProjector(source);
    this.targetNormals = vertexNormals(target);
    this.wSource = normalised(lumpedMass(source));
    this.wTarget = normalised(lumpedMass(target));
    this.closest = new Float64Array(3 * n);
    this.closestWeight = new Float64Array(n);
    this.closestDistance = new Float64Array(n).fill(Infinity);
    this.xNormals = new Float64Array(3 * n);
    this.backCorners = new Uint32Array(3 * m);
    this.backWeights = new Float64Array(3 * m);
    this.backWeight = new Float64Array(m);
  }

  /** Whether source vertex i is matched to the target's boundary (both surfaces open). */
  boundaryToBoundary(i: number): boolean {
    return this.sourceEdge.onBoundary[i] === 1 && !this.targetEdge.empty;
  }

  /** Forget the last pairs (the source moved by a map the bounds do not follow). */
  forget(): void {
    this.backKnown = false;
    this.closestDistance.fill(Infinity);
  }

  /** The target point of each listed source vertex at positions x. */
  sourceToTarget(x: Float64Array, list: Uint32Array, weights: Float64Array): void {
    const { closest, closestWeight, closestDistance, xNormals, onTarget, targetEdge, targetNormals } = this;
    vertexNormals({ positions: x, triangles: this.source.triangles }, xNormals);
    for (const i of list) {
      // the last closest point bounds the new distance (triangle inequality), which prunes the search
      const near = closestDistance[i] === Infinity ? Infinity : Math.hypot(x[3 * i] - closest[3 * i], x[3 * i + 1] - closest[3 * i + 1], x[3 * i + 2] - closest[3 * i + 2]) * (1 + 1e-9) + 1e-12;
      closest[3 * i] = x[3 * i]; closest[3 * i + 1] = x[3 * i + 1]; closest[3 * i + 2] = x[3 * i + 2];
      if (this.boundaryToBoundary(i)) {
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
      closestWeight[i] = agreement(targetNormals, k, w, xNormals, i) < NORMAL_AGREEMENT ? 0 : weights[i];
    }
  }

  /**
   * The source point of each listed target vertex. `onSource` holds the source surface in some frame
   * (`frame`: its positions there, `normals`: its vertex normals there); `toFrame` takes a target point
   * into that frame and `normalToTarget` (3×3, the cofactor matrix of the frame's map) the normals back.
   */
  targetToSource(onSource: SurfaceProjector, frame: Float64Array, normals: Float64Array, list: Uint32Array, weights: Float64Array, toFrame?: AffineMap, normalToTarget?: number[]): void {
    const { backCorners, backWeights, backWeight, scratch, targetNormals } = this;
    const y = this.target.positions;
    for (const j of list) {
      if (this.targetEdge.onBoundary[j] && !this.sourceEdge.empty) { backWeight[j] = 0; continue; } // the source's boundary is pulled onto this one from the other side
      scratch[0] = y[3 * j]; scratch[1] = y[3 * j + 1]; scratch[2] = y[3 * j + 2];
      if (toFrame) applyAffine(toFrame, scratch, scratch);
      let near = Infinity;
      if (this.backKnown) {
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
      if (onEdgeOf(this.sourceEdge.onBoundary, k, w)) continue;
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
    this.backKnown = true;
  }
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

/** Whether a hit (corners k, weights w) lies on an edge whose two ends are both boundary vertices. */
function onEdgeOf(boundary: Uint8Array, k: ArrayLike<number>, w: ArrayLike<number>): boolean {
  for (let r = 0; r < 3; r++) {
    if (w[r] > 1e-6) continue;
    if (boundary[k[(r + 1) % 3]] && boundary[k[(r + 2) % 3]]) return true;
  }
  return false;
}

function normalised(w: Float64Array): Float64Array {
  let s = 0;
  for (let i = 0; i < w.length; i++) s += w[i];
  for (let i = 0; i < w.length; i++) w[i] /= s;
  return w;
}
