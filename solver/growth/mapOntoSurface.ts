import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { symmetricEigen } from '../linalg/symmetricEigen.ts';

export type Alignment = 'none' | 'rigid' | 'similarity';

export interface SurfaceMap {
  /** the source's vertices placed on the target surface, in the source's order */
  positions: Float64Array;
  /** source triangles the map turns over, and those it shrinks below 1/1000 of their area */
  folded: number[];
  collapsed: number[];
  /** the alignment applied before projecting: x → scale·R(x − from) + to */
  transform: { scale: number; rotation: number[]; from: [number, number, number]; to: [number, number, number] };
  /** largest distance a vertex moved in the final projection */
  maxDistance: number;
}

/**
 * Carry a surface onto another with different connectivity (a later stage of
 * a limb bud scanned separately, say): optionally align it first by iterative
 * closest points with the optimal rigid or similarity transform of each round
 * (Horn, J. Opt. Soc. Am. A 4 (1987) 629: unit quaternions), then move every
 * vertex to its closest point on the target, found with a bounding-volume
 * hierarchy (three-mesh-bvh). Triangles the map turns over or collapses are
 * listed, so the caller can refuse a map that folds.
 */
export function mapOntoSurface(source: Mesh, target: Mesh, alignment: Alignment = 'none', rounds = 30): SurfaceMap {
  const projector = new SurfaceProjector(target);
  const n = source.positions.length / 3;
  const p = Float64Array.from(source.positions);
  const closest = new Float64Array(3 * n);
  const project = (from: Float64Array) => {
    let far = 0;
    closest.set(from);
    for (let i = 0; i < n; i++) {
      projector.project(closest, i);
      far = Math.max(far, projector.distance);
    }
    return far;
  };
  let transform: SurfaceMap['transform'] = { scale: 1, rotation: [1, 0, 0, 0, 1, 0, 0, 0, 1], from: [0, 0, 0], to: [0, 0, 0] };
  if (alignment !== 'none') {
    // start from matching centroids and sizes, then iterate closest points + best transform
    const cs = centroid(source.positions), ct = centroid(target.positions);
    const s0 = alignment === 'similarity' ? Math.sqrt(spread(target.positions, ct) / spread(source.positions, cs)) : 1;
    transform = { scale: s0, rotation: [1, 0, 0, 0, 1, 0, 0, 0, 1], from: cs, to: ct };
    for (let round = 0; round < rounds; round++) {
      apply(transform, source.positions, p);
      project(p);
      transform = bestTransform(source.positions, closest, alignment === 'similarity');
    }
    apply(transform, source.positions, p);
  }
  const maxDistance = project(p);
  // fold check: each triangle's normal after the map against its (aligned) normal before
  const folded: number[] = [], collapsed: number[] = [];
  const tri = source.triangles;
  for (let t = 0; t < tri.length; t += 3) {
    const before = normal(p, tri[t], tri[t + 1], tri[t + 2]), after = normal(closest, tri[t], tri[t + 1], tri[t + 2]);
    const a0 = Math.hypot(...before), a1 = Math.hypot(...after);
    if (before[0] * after[0] + before[1] * after[1] + before[2] * after[2] <= 0) folded.push(t / 3);
    else if (a1 < 1e-3 * a0) collapsed.push(t / 3);
  }
  return { positions: closest, folded, collapsed, transform, maxDistance };
}

function centroid(x: Float64Array): [number, number, number] {
  const n = x.length / 3;
  const c: [number, number, number] = [0, 0, 0];
  for (let i = 0; i < n; i++) for (let d = 0; d < 3; d++) c[d] += x[3 * i + d] / n;
  return c;
}

function spread(x: Float64Array, c: number[]): number {
  let s = 0;
  for (let i = 0; i < x.length; i += 3) s += (x[i] - c[0]) ** 2 + (x[i + 1] - c[1]) ** 2 + (x[i + 2] - c[2]) ** 2;
  return s / (x.length / 3);
}

function apply(t: SurfaceMap['transform'], x: Float64Array, out: Float64Array): void {
  const R = t.rotation;
  for (let i = 0; i < x.length; i += 3) {
    const a = x[i] - t.from[0], b = x[i + 1] - t.from[1], c = x[i + 2] - t.from[2];
    out[i] = t.to[0] + t.scale * (R[0] * a + R[1] * b + R[2] * c);
    out[i + 1] = t.to[1] + t.scale * (R[3] * a + R[4] * b + R[5] * c);
    out[i + 2] = t.to[2] + t.scale * (R[6] * a + R[7] * b + R[8] * c);
  }
}

/** The rotation (and scale) taking points p onto points q best in least squares (Horn 1987). */
function bestTransform(p: Float64Array, q: Float64Array, withScale: boolean): SurfaceMap['transform'] {
  const cp = centroid(p), cq = centroid(q);
  const S = new Float64Array(9);
  let sp = 0, sq = 0;
  for (let i = 0; i < p.length; i += 3) {
    const a = [p[i] - cp[0], p[i + 1] - cp[1], p[i + 2] - cp[2]];
    const b = [q[i] - cq[0], q[i + 1] - cq[1], q[i + 2] - cq[2]];
    for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) S[3 * r + c] += a[r] * b[c];
    sp += a[0] ** 2 + a[1] ** 2 + a[2] ** 2;
    sq += b[0] ** 2 + b[1] ** 2 + b[2] ** 2;
  }
  const [xx, xy, xz, yx, yy, yz, zx, zy, zz] = S;
  const N = Float64Array.from([
    xx + yy + zz, yz - zy, zx - xz, xy - yx,
    yz - zy, xx - yy - zz, xy + yx, zx + xz,
    zx - xz, xy + yx, -xx + yy - zz, yz + zy,
    xy - yx, zx + xz, yz + zy, -xx - yy + zz,
  ]);
  const { vectors } = symmetricEigen(N, 4); // eigenvalues ascending: the last column is the rotation
  const [w, x, y, z] = [vectors[3], vectors[7], vectors[11], vectors[15]];
  const rotation = [
    w * w + x * x - y * y - z * z, 2 * (x * y - w * z), 2 * (x * z + w * y),
    2 * (y * x + w * z), w * w - x * x + y * y - z * z, 2 * (y * z - w * x),
    2 * (z * x - w * y), 2 * (z * y + w * x), w * w - x * x - y * y + z * z,
  ];
  return { scale: withScale ? Math.sqrt(sq / sp) : 1, rotation, from: cp, to: cq };
}

function normal(x: Float64Array, a: number, b: number, c: number): [number, number, number] {
  const ux = x[3 * b] - x[3 * a], uy = x[3 * b + 1] - x[3 * a + 1], uz = x[3 * b + 2] - x[3 * a + 2];
  const vx = x[3 * c] - x[3 * a], vy = x[3 * c + 1] - x[3 * a + 1], vz = x[3 * c + 2] - x[3 * a + 2];
  return [uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx];
}
