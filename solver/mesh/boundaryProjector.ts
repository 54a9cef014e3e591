import type { Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';

/**
 * Closest points on the open boundaries of a triangle mesh (its boundary
 * loops as polylines), by a scan of their edges: boundaries hold O(√n) edges,
 * so a scan per query stays cheap. Used to keep a boundary on a boundary when
 * one surface is carried onto another. Positions are read at each query, so
 * a moving mesh can be followed.
 */
export class BoundaryProjector {
  /** boundary edges as vertex pairs */
  readonly edges: Uint32Array;
  /** 1 for a vertex on an open boundary */
  readonly onBoundary: Uint8Array;
  /** the last hit: the edge's ends and the weight of the second */
  readonly corners = new Uint32Array(2);
  weight = 0;
  distance = 0;

  constructor(private readonly mesh: Mesh) {
    const loops = meshTopology(mesh).boundaryLoops;
    const edges: number[] = [];
    this.onBoundary = new Uint8Array(mesh.positions.length / 3);
    for (const loop of loops) {
      for (let k = 0; k < loop.length; k++) {
        edges.push(loop[k], loop[(k + 1) % loop.length]);
        this.onBoundary[loop[k]] = 1;
      }
    }
    this.edges = Uint32Array.from(edges);
  }

  get empty(): boolean {
    return this.edges.length === 0;
  }

  /** Move the point at out[3i..3i+2] to its closest point on the boundary. */
  project(out: Float64Array, i: number, positions: Float64Array = this.mesh.positions): void {
    const x = out[3 * i], y = out[3 * i + 1], z = out[3 * i + 2];
    let best = Infinity, bx = x, by = y, bz = z;
    const e = this.edges, p = positions;
    for (let k = 0; k < e.length; k += 2) {
      const a = 3 * e[k], b = 3 * e[k + 1];
      const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
      const l2 = ux * ux + uy * uy + uz * uz;
      let s = l2 > 0 ? ((x - p[a]) * ux + (y - p[a + 1]) * uy + (z - p[a + 2]) * uz) / l2 : 0;
      s = s < 0 ? 0 : s > 1 ? 1 : s;
      const qx = p[a] + s * ux, qy = p[a + 1] + s * uy, qz = p[a + 2] + s * uz;
      const d = (qx - x) ** 2 + (qy - y) ** 2 + (qz - z) ** 2;
      if (d < best) {
        best = d; bx = qx; by = qy; bz = qz;
        this.corners[0] = e[k]; this.corners[1] = e[k + 1]; this.weight = s;
      }
    }
    this.distance = Math.sqrt(best);
    out[3 * i] = bx; out[3 * i + 1] = by; out[3 * i + 2] = bz;
  }
}
