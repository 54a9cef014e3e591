import { BufferAttribute, BufferGeometry, Vector3 } from 'three';
import { MeshBVH } from 'three-mesh-bvh';
import type { Mesh } from './Mesh.ts';

/**
 * Closest points on a fixed triangle mesh, through a bounding-volume
 * hierarchy (three-mesh-bvh): the point, its distance, and (on request) a
 * per-vertex value interpolated there, to carry data onto new vertices.
 */
export class SurfaceProjector {
  private readonly bvh: MeshBVH;
  /** the triangles as the BVH ordered them (it sorts the index buffer in place; hits count in this order) */
  private readonly order: ArrayLike<number>;
  private readonly hit = { point: new Vector3(), distance: 0, faceIndex: 0 };
  private readonly query = new Vector3();
  /** the last hit's distance from the point projected */
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
    out[3 * i] = h.x; out[3 * i + 1] = h.y; out[3 * i + 2] = h.z;
  }

  /** A per-vertex value of the surface at the last hit, interpolated by its barycentric coordinates in the triangle hit. */
  interpolate(values: ArrayLike<number>): number {
    const p = this.surface.positions, t = this.order, f = this.hit.faceIndex, h = this.hit.point;
    const a = t[3 * f], b = t[3 * f + 1], c = t[3 * f + 2];
    const e0 = [p[3 * b] - p[3 * a], p[3 * b + 1] - p[3 * a + 1], p[3 * b + 2] - p[3 * a + 2]];
    const e1 = [p[3 * c] - p[3 * a], p[3 * c + 1] - p[3 * a + 1], p[3 * c + 2] - p[3 * a + 2]];
    const d = [h.x - p[3 * a], h.y - p[3 * a + 1], h.z - p[3 * a + 2]];
    const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
    const d00 = dot(e0, e0), d01 = dot(e0, e1), d11 = dot(e1, e1), d20 = dot(d, e0), d21 = dot(d, e1);
    const den = d00 * d11 - d01 * d01;
    const wb = Math.min(1, Math.max(0, den > 0 ? (d11 * d20 - d01 * d21) / den : 0));
    const wc = Math.min(1 - wb, Math.max(0, den > 0 ? (d00 * d21 - d01 * d20) / den : 0));
    return (1 - wb - wc) * values[a] + wb * values[b] + wc * values[c];
  }
}
