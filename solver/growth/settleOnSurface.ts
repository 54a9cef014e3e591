import { meshTopology } from '../mesh/meshTopology.ts';
import { triangleAreas } from '../mesh/triangleAreas.ts';
import type { SurfaceCorrespondences } from './surfaceCorrespondences.ts';

/** A triangle whose centre lies farther from the target than this fraction of its longest edge spans a gap (a chord's sagitta is far smaller). */
const BRIDGE_FRACTION = 0.25;
/** Rounds of relaxation that may follow the final projection to undo folds. */
const UNFOLD_ROUNDS = 40;

export interface Settled {
  /** largest distance a vertex moved onto the target */
  maxDistance: number;
  /** triangles turned over against the target's orientation, shrunk below 1/1000 of their area, or spanning a gap of it */
  folded: number[];
  collapsed: number[];
  bridging: number[];
  /** vertices moved again to undo folds */
  relaxed: number;
}

/**
 * Put the source's positions x (in place) on the target: every vertex to its
 * closest point (boundary vertices to the target's boundary), then undo the
 * triangles that this turns over — their corners moved to their neighbours'
 * mean and back onto the target, the region widened by a ring every tenth
 * round. What still folds, collapses or spans a gap is listed.
 */
export function settleOnSurface(x: Float64Array, corr: SurfaceCorrespondences): Settled {
  const { source, onTarget, targetEdge, targetNormals, closest, closestDistance } = corr;
  const tri = source.triangles;
  const n = x.length / 3;
  const registered = Float64Array.from(x);
  let maxDistance = 0;
  for (let i = 0; i < n; i++) {
    if (corr.boundaryToBoundary(i)) {
      targetEdge.project(x, i);
      maxDistance = Math.max(maxDistance, targetEdge.distance);
    } else {
      // the last closest point bounds the distance
      onTarget.project(x, i, closestDistance[i] === Infinity ? Infinity : Math.hypot(x[3 * i] - closest[3 * i], x[3 * i + 1] - closest[3 * i + 1], x[3 * i + 2] - closest[3 * i + 2]) * (1 + 1e-9) + 1e-12);
      maxDistance = Math.max(maxDistance, onTarget.distance);
    }
  }
  const restArea = triangleAreas({ positions: registered, triangles: tri });
  const centre = new Float64Array(3);
  /** 0 good, 1 folded, 2 collapsed, 3 spanning a gap */
  const bad = (t: number): 0 | 1 | 2 | 3 => {
    const A = tri[3 * t], B = tri[3 * t + 1], C = tri[3 * t + 2];
    const ux = x[3 * B] - x[3 * A], uy = x[3 * B + 1] - x[3 * A + 1], uz = x[3 * B + 2] - x[3 * A + 2];
    const vx = x[3 * C] - x[3 * A], vy = x[3 * C + 1] - x[3 * A + 1], vz = x[3 * C + 2] - x[3 * A + 2];
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    for (let d = 0; d < 3; d++) centre[d] = (x[3 * A + d] + x[3 * B + d] + x[3 * C + d]) / 3;
    // the corner A lies on the target: the centre is no farther from it than from A
    onTarget.project(centre, 0, Math.hypot(centre[0] - x[3 * A], centre[1] - x[3 * A + 1], centre[2] - x[3 * A + 2]) * (1 + 1e-9) + 1e-12);
    const k = onTarget.corners, w = onTarget.weights;
    let dot = 0;
    for (let d = 0; d < 3; d++) dot += (d === 0 ? cx : d === 1 ? cy : cz) * (w[0] * targetNormals[3 * k[0] + d] + w[1] * targetNormals[3 * k[1] + d] + w[2] * targetNormals[3 * k[2] + d]);
    if (dot <= 0) return 1;
    if (0.5 * Math.hypot(cx, cy, cz) < 1e-3 * restArea[t]) return 2;
    // a triangle whose corners lie on the target but whose middle does not spans a gap (a hole, a cleft)
    const longest = Math.sqrt(Math.max(ux * ux + uy * uy + uz * uz, vx * vx + vy * vy + vz * vz, (vx - ux) ** 2 + (vy - uy) ** 2 + (vz - uz) ** 2));
    return onTarget.distance > BRIDGE_FRACTION * longest ? 3 : 0;
  };
  let badTriangles: number[] = [];
  for (let t = 0; t < tri.length / 3; t++) if (bad(t)) badTriangles.push(t);
  const topo = meshTopology(source);
  const moved = new Uint8Array(n);
  for (let round = 0; round < UNFOLD_ROUNDS && badTriangles.length > 0; round++) {
    let region = new Set<number>();
    for (const t of badTriangles) for (let c = 0; c < 3; c++) region.add(tri[3 * t + c]);
    for (let ring = 0; ring < Math.floor(round / 10); ring++) {
      const wider = new Set(region);
      for (const v of region) for (let s = topo.vertexNeighbourOffsets[v]; s < topo.vertexNeighbourOffsets[v + 1]; s++) wider.add(topo.vertexNeighbours[s]);
      region = wider;
    }
    for (const v of region) {
      if (corr.sourceEdge.onBoundary[v]) continue;
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
  let relaxed = 0;
  for (let i = 0; i < n; i++) relaxed += moved[i];
  return { maxDistance, folded, collapsed, bridging, relaxed };
}
