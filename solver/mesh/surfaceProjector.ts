import { BufferAttribute, BufferGeometry, Vector3 } from 'three';
import { MeshBVH } from 'three-mesh-bvh';
import type { Mesh } from './Mesh.ts';

/**
 * Closest points on a fixed triangle mesh, through a bounding-volume
 * hierarchy (three-mesh-bvh): the point, its distance, the triangle it lies
 * in and its barycentric coordinates there (to carry per-vertex data).
 */
export class SurfaceProjector {
  private readonly bvh: MeshBVH;
  /** the triangles as the BVH ordered them (it sorts the index buffer in place; hits count in this order) */
  private readonly order: ArrayLike<number>;
  private readonly hit = { point: new Vector3(), distance: 0, faceIndex: 0 };
  private readonly query = new Vector3();
  /** barycentric coordinates of the last hit in its triangle */
  readonly weights = new Float64Array(3);
  /** the hit's triangle, in the BVH's order of the triangles */
  triangle = 0;
  distance = 0;

  constructor(private readonly surface: Mesh) {
    const geometry = new BufferGeometry();
    geometry.setAttribute('position', new BufferAttribute(Float32Array.from(surface.positions), 3));
    geometry.setIndex(new BufferAttribute(Uint32Array.from(surface.triangles), 1));
    this.bvh = new MeshBVH(geometry);
    this.order = geometry.index!.array;
  }

  /**
   * Move (x, y, z) at `out[3i..3i+2]` to its closest point on the surface. `near`: a distance the
   * point is expected within (the search looks no farther first, which prunes most of the tree).
   */
  project(out: Float64Array | number[], i: number, near = Infinity): void {
    this.query.set(out[3 * i], out[3 * i + 1], out[3 * i + 2]);
    if (!this.bvh.closestPointToPoint(this.query, this.hit, 0, near) && near < Infinity) this.bvh.closestPointToPoint(this.query, this.hit);
    const h = this.hit.point;
    this.distance = this.hit.distance;
    this.triangle = this.hit.faceIndex;
    out[3 * i] = h.x; out[3 * i + 1] = h.y; out[3 * i + 2] = h.z;
    // barycentric coordinates of the hit in its triangle (in double precision from the surface's own corners)
    const p = this.surface.positions, t = this.order, f = this.triangle;
    const a = 3 * t[3 * f], b = 3 * t[3 * f + 1], c = 3 * t[3 * f + 2];
    const e0 = [p[b] - p[a], p[b + 1] - p[a + 1], p[b + 2] - p[a + 2]];
    const e1 = [p[c] - p[a], p[c + 1] - p[a + 1], p[c + 2] - p[a + 2]];
    const d = [h.x - p[a], h.y - p[a + 1], h.z - p[a + 2]];
    const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
    const d00 = dot(e0, e0), d01 = dot(e0, e1), d11 = dot(e1, e1), d20 = dot(d, e0), d21 = dot(d, e1);
    const den = d00 * d11 - d01 * d01;
    const v = den > 0 ? (d11 * d20 - d01 * d21) / den : 0, w = den > 0 ? (d00 * d21 - d01 * d20) / den : 0;
    this.weights[1] = Math.min(1, Math.max(0, v));
    this.weights[2] = Math.min(1 - this.weights[1], Math.max(0, w));
    this.weights[0] = 1 - this.weights[1] - this.weights[2];
  }

  /** A per-vertex value of the surface at the last hit, interpolated. */
  interpolate(values: ArrayLike<number>): number {
    const t = this.order, f = this.triangle;
    return this.weights[0] * values[t[3 * f]] + this.weights[1] * values[t[3 * f + 1]] + this.weights[2] * values[t[3 * f + 2]];
  }
}
