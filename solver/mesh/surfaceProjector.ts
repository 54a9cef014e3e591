import type { Mesh } from './Mesh.ts';

/** Triangles per leaf of the tree. */
const LEAF_SIZE = 4;

/**
 * Closest points on a fixed triangle mesh: the point, its distance, the
 * triangle and barycentric weights there (to carry per-vertex data onto new
 * points). A bounding-volume hierarchy over the triangles (boxes split at the
 * median centroid along their longest side), in flat typed arrays and double
 * precision, searched nearest box first with pruning by the best distance so
 * far — and by a distance the caller knows the point to lie within, when it
 * does (a point that moved a little since its last query). The closest point
 * in a triangle follows Ericson, "Real-Time Collision Detection" (2005), §5.1.5.
 */
export class SurfaceProjector {
  /** per node: box (min xyz, max xyz) */
  private readonly boxes: Float64Array;
  /** per node: first child (inner node) or first triangle in `order` (leaf) */
  private readonly first: Uint32Array;
  /** per node: 0 for an inner node (children first, first + 1), else the leaf's triangle count */
  private readonly count: Uint32Array;
  /** triangles in leaf order */
  private readonly order: Uint32Array;
  private readonly stack: Uint32Array;
  /** corner coordinates of the triangles in leaf order (9 per triangle), for locality */
  private readonly coords: Float64Array;
  private p: Float64Array;
  private readonly tri: Uint32Array;
  /** the last hit's distance from the point projected */
  distance = 0;
  /** the last hit's triangle (index into the surface's triangles) */
  triangle = 0;
  /** The last hit's triangle corners (vertex indices of the surface) and barycentric weights. */
  readonly corners = new Uint32Array(3);
  readonly weights = new Float64Array(3);
  private hx = 0;
  private hy = 0;
  private hz = 0;

  constructor(surface: Mesh) {
    this.p = surface.positions;
    this.tri = surface.triangles;
    const nT = this.tri.length / 3;
    const order = new Uint32Array(nT);
    const centre = new Float64Array(3 * nT);
    for (let t = 0; t < nT; t++) {
      order[t] = t;
      for (let d = 0; d < 3; d++) centre[3 * t + d] = (this.p[3 * this.tri[3 * t] + d] + this.p[3 * this.tri[3 * t + 1] + d] + this.p[3 * this.tri[3 * t + 2] + d]) / 3;
    }
    const maxNodes = 2 * nT + 1;
    const boxes = new Float64Array(6 * maxNodes), first = new Uint32Array(maxNodes), count = new Uint32Array(maxNodes);
    // build from a stack of (node, start, end); children are numbered after their parent
    const work: number[] = [0, 0, nT];
    let nodes = 1, depth = 0;
    const depthOf = new Uint32Array(maxNodes);
    while (work.length) {
      const end = work.pop()!, start = work.pop()!, node = work.pop()!;
      // the split: at the median centroid along the longest side of the centroids' box
      let c0 = Infinity, c1 = Infinity, c2 = Infinity, C0 = -Infinity, C1 = -Infinity, C2 = -Infinity;
      for (let s = start; s < end; s++) {
        const t = order[s];
        const a = centre[3 * t], b = centre[3 * t + 1], c = centre[3 * t + 2];
        if (a < c0) c0 = a; if (a > C0) C0 = a;
        if (b < c1) c1 = b; if (b > C1) C1 = b;
        if (c < c2) c2 = c; if (c > C2) C2 = c;
      }
      depth = Math.max(depth, depthOf[node]);
      if (end - start <= LEAF_SIZE) {
        first[node] = start;
        count[node] = end - start;
        continue;
      }
      const axis = C0 - c0 >= C1 - c1 && C0 - c0 >= C2 - c2 ? 0 : C1 - c1 >= C2 - c2 ? 1 : 2;
      const mid = (start + end) >> 1;
      selectByKey(order, start, end, mid, (t) => centre[3 * t + axis]);
      const left = nodes;
      nodes += 2;
      first[node] = left;
      count[node] = 0;
      depthOf[left] = depthOf[left + 1] = depthOf[node] + 1;
      work.push(left, start, mid, left + 1, mid, end);
    }
    this.boxes = boxes.subarray(0, 6 * nodes);
    this.first = first.subarray(0, nodes);
    this.count = count.subarray(0, nodes);
    this.order = order;
    this.stack = new Uint32Array(2 * depth + 8);
    this.coords = new Float64Array(9 * nT);
    this.refit(this.p); // the boxes, bottom-up
  }

  /**
   * Follow the surface to new positions (same triangles): the boxes are
   * recomputed bottom-up with the tree kept (as the constructor does), so a surface that moves smoothly
   * is searched almost as fast as one built afresh, at a fraction of the cost.
   */
  refit(positions: Float64Array): void {
    this.p = positions;
    this.gather();
    const { boxes, first, count } = this;
    // children always follow their parent, so a backward sweep sees children first
    for (let node = count.length - 1; node >= 0; node--) {
      const o = 6 * node;
      if (count[node] > 0) {
        let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity;
        for (let s = first[node], e = s + count[node]; s < e; s++) {
          for (let k = 0; k < 9; k += 3) {
            const a = this.coords[9 * s + k], b = this.coords[9 * s + k + 1], c = this.coords[9 * s + k + 2];
            if (a < x0) x0 = a; if (a > x1) x1 = a;
            if (b < y0) y0 = b; if (b > y1) y1 = b;
            if (c < z0) z0 = c; if (c > z1) z1 = c;
          }
        }
        boxes[o] = x0; boxes[o + 1] = y0; boxes[o + 2] = z0; boxes[o + 3] = x1; boxes[o + 4] = y1; boxes[o + 5] = z1;
      } else {
        const l = 6 * first[node], r = l + 6;
        for (let d = 0; d < 3; d++) {
          boxes[o + d] = Math.min(boxes[l + d], boxes[r + d]);
          boxes[o + 3 + d] = Math.max(boxes[l + 3 + d], boxes[r + 3 + d]);
        }
      }
    }
  }

  private gather(): void {
    const { order, tri, p, coords } = this;
    for (let s = 0; s < order.length; s++) {
      const t = order[s];
      for (let k = 0; k < 3; k++) {
        const v = 3 * tri[3 * t + k];
        coords[9 * s + 3 * k] = p[v]; coords[9 * s + 3 * k + 1] = p[v + 1]; coords[9 * s + 3 * k + 2] = p[v + 2];
      }
    }
  }

  /**
   * Move (x, y, z) at `out[3i..3i+2]` to its closest point on the surface. `near`: a distance the
   * point is known to lie within (the search looks no farther, which prunes most of the tree;
   * when nothing is found within it, the whole surface is searched).
   */
  project(out: Float64Array | number[], i: number, near = Infinity): void {
    const px = out[3 * i], py = out[3 * i + 1], pz = out[3 * i + 2];
    if (!this.search(px, py, pz, near * near) && near < Infinity) this.search(px, py, pz, Infinity);
    out[3 * i] = this.hx; out[3 * i + 1] = this.hy; out[3 * i + 2] = this.hz;
  }

  /** A per-vertex value of the surface at the last hit, interpolated by its barycentric weights. */
  interpolate(values: ArrayLike<number>): number {
    const k = this.corners, w = this.weights;
    return w[0] * values[k[0]] + w[1] * values[k[1]] + w[2] * values[k[2]];
  }

  private search(px: number, py: number, pz: number, bound2: number): boolean {
    const { boxes, first, count, order, stack, coords: q, tri } = this;
    if (order.length === 0) return false; // no triangles: nothing to find (and no leaf to end on)
    let best = bound2, found = false;
    let top = 0;
    stack[top++] = 0;
    while (top > 0) {
      const node = stack[--top];
      if (boxDistance2(boxes, node, px, py, pz) >= best) continue;
      const c = count[node];
      if (c === 0) {
        const l = first[node], r = l + 1;
        const dl = boxDistance2(boxes, l, px, py, pz), dr = boxDistance2(boxes, r, px, py, pz);
        // push the farther first, so the nearer is searched first
        if (dl <= dr) {
          if (dr < best) stack[top++] = r;
          if (dl < best) stack[top++] = l;
        } else {
          if (dl < best) stack[top++] = l;
          if (dr < best) stack[top++] = r;
        }
        continue;
      }
      for (let s = first[node], e = s + c; s < e; s++) {
        const o = 9 * s;
        const d2 = this.closestInTriangle(px, py, pz, q[o], q[o + 1], q[o + 2], q[o + 3], q[o + 4], q[o + 5], q[o + 6], q[o + 7], q[o + 8], best);
        if (d2 < best) {
          const t = order[s];
          best = d2;
          found = true;
          this.triangle = t;
          this.corners[0] = tri[3 * t]; this.corners[1] = tri[3 * t + 1]; this.corners[2] = tri[3 * t + 2];
          this.weights[0] = this.wa; this.weights[1] = this.wb; this.weights[2] = this.wc;
          this.hx = this.qx; this.hy = this.qy; this.hz = this.qz;
        }
      }
    }
    if (found) this.distance = Math.sqrt(best);
    return found;
  }

  // the candidate of closestInTriangle
  private qx = 0;
  private qy = 0;
  private qz = 0;
  private wa = 0;
  private wb = 0;
  private wc = 0;

  /** Squared distance from p to triangle abc, with the closest point and its weights in q·/w· (when below `best`). */
  private closestInTriangle(px: number, py: number, pz: number, ax: number, ay: number, az: number, bx: number, by: number, bz: number, cx: number, cy: number, cz: number, best: number): number {
    const abx = bx - ax, aby = by - ay, abz = bz - az;
    const acx = cx - ax, acy = cy - ay, acz = cz - az;
    const apx = px - ax, apy = py - ay, apz = pz - az;
    const d1 = abx * apx + aby * apy + abz * apz, d2 = acx * apx + acy * apy + acz * apz;
    let u: number, v: number, w: number; // weights of a, b, c
    if (d1 <= 0 && d2 <= 0) { u = 1; v = 0; w = 0; } else {
      const bpx = px - bx, bpy = py - by, bpz = pz - bz;
      const d3 = abx * bpx + aby * bpy + abz * bpz, d4 = acx * bpx + acy * bpy + acz * bpz;
      if (d3 >= 0 && d4 <= d3) { u = 0; v = 1; w = 0; } else {
        const vc = d1 * d4 - d3 * d2;
        if (vc <= 0 && d1 >= 0 && d3 <= 0) { const s = d1 / (d1 - d3); u = 1 - s; v = s; w = 0; } else {
          const cpx = px - cx, cpy = py - cy, cpz = pz - cz;
          const d5 = abx * cpx + aby * cpy + abz * cpz, d6 = acx * cpx + acy * cpy + acz * cpz;
          if (d6 >= 0 && d5 <= d6) { u = 0; v = 0; w = 1; } else {
            const vb = d5 * d2 - d1 * d6;
            if (vb <= 0 && d2 >= 0 && d6 <= 0) { const s = d2 / (d2 - d6); u = 1 - s; v = 0; w = s; } else {
              const va = d3 * d6 - d5 * d4;
              if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) { const s = (d4 - d3) / (d4 - d3 + (d5 - d6)); u = 0; v = 1 - s; w = s; } else {
                const den = 1 / (va + vb + vc);
                v = vb * den; w = vc * den; u = 1 - v - w;
              }
            }
          }
        }
      }
    }
    const qx = u * ax + v * bx + w * cx, qy = u * ay + v * by + w * cy, qz = u * az + v * bz + w * cz;
    const dist2 = (px - qx) ** 2 + (py - qy) ** 2 + (pz - qz) ** 2;
    if (dist2 < best) { this.qx = qx; this.qy = qy; this.qz = qz; this.wa = u; this.wb = v; this.wc = w; }
    return dist2;
  }
}

function boxDistance2(boxes: Float64Array, node: number, px: number, py: number, pz: number): number {
  const o = 6 * node;
  const dx = px < boxes[o] ? boxes[o] - px : px > boxes[o + 3] ? px - boxes[o + 3] : 0;
  const dy = py < boxes[o + 1] ? boxes[o + 1] - py : py > boxes[o + 4] ? py - boxes[o + 4] : 0;
  const dz = pz < boxes[o + 2] ? boxes[o + 2] - pz : pz > boxes[o + 5] ? pz - boxes[o + 5] : 0;
  return dx * dx + dy * dy + dz * dz;
}

/** Reorder a[start..end) so that a[k] holds the element of rank k by key, smaller keys before it, larger after (quickselect). */
function selectByKey(a: Uint32Array, start: number, end: number, k: number, key: (t: number) => number): void {
  let lo = start, hi = end - 1;
  while (hi > lo) {
    const pivot = key(a[(lo + hi) >> 1]);
    let i = lo, j = hi;
    while (i <= j) {
      while (key(a[i]) < pivot) i++;
      while (key(a[j]) > pivot) j--;
      if (i <= j) { const t = a[i]; a[i] = a[j]; a[j] = t; i++; j--; }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}
