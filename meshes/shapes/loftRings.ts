import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';

/**
 * A closed loop of points across a tube, at parameter values (i + phase)/n,
 * i = 0…n−1, running the same way round as its neighbours.
 */
export interface Ring {
  points: Float64Array; // 3·n
  phase: number; // in [0, 1)
}

export interface LoftOptions {
  /** close the first ring with a fan to this point */
  startPole?: [number, number, number];
  /** close the last ring with a fan to this point */
  endPole?: [number, number, number];
  /** join the last ring back to the first (a torus-like tube) */
  periodic?: boolean;
}

/**
 * Triangulate a sequence of rings into a tube surface. Neighbouring rings may have
 * different point counts: the band between them is zipped by advancing whichever
 * ring's next point comes first in the shared parameter. Triangles are turned to
 * face away from their ring's centre.
 */
export function loftRings(rings: Ring[], options: LoftOptions = {}): Mesh {
  let nV = 0;
  const base: number[] = [];
  for (const r of rings) {
    base.push(nV);
    nV += r.points.length / 3;
  }
  const startPole = options.startPole ? nV++ : -1;
  const endPole = options.endPole ? nV++ : -1;
  const positions = new Float64Array(3 * nV);
  rings.forEach((r, k) => positions.set(r.points, 3 * base[k]));
  if (options.startPole) positions.set(options.startPole, 3 * startPole);
  if (options.endPole) positions.set(options.endPole, 3 * endPole);
  const tri: number[] = [];
  const bands = options.periodic ? rings.length : rings.length - 1;
  for (let k = 0; k < bands; k++) {
    const A = rings[k], B = rings[(k + 1) % rings.length];
    const nA = A.points.length / 3, nB = B.points.length / 3;
    const bA = base[k], bB = base[(k + 1) % rings.length];
    let i = 0, j = 0;
    while (i < nA || j < nB) {
      const nextA = (i + 1 + A.phase) / nA;
      const nextB = (j + 1 + B.phase) / nB;
      if (j >= nB || (i < nA && nextA <= nextB)) {
        tri.push(bA + (i % nA), bA + ((i + 1) % nA), bB + (j % nB));
        i++;
      } else {
        tri.push(bA + (i % nA), bB + ((j + 1) % nB), bB + (j % nB));
        j++;
      }
    }
  }
  if (startPole >= 0) {
    const n = rings[0].points.length / 3;
    for (let j = 0; j < n; j++) tri.push(startPole, base[0] + ((j + 1) % n), base[0] + j);
  }
  if (endPole >= 0) {
    const last = rings.length - 1;
    const n = rings[last].points.length / 3;
    for (let i = 0; i < n; i++) tri.push(base[last] + i, base[last] + ((i + 1) % n), endPole);
  }
  const triangles = Uint32Array.from(tri);
  // Orientation: normals should point away from the ring centres.
  let flux = 0;
  const centre = rings.map((r) => {
    const n = r.points.length / 3;
    let x = 0, y = 0, z = 0;
    for (let i = 0; i < n; i++) { x += r.points[3 * i]; y += r.points[3 * i + 1]; z += r.points[3 * i + 2]; }
    return [x / n, y / n, z / n];
  });
  const ringOf = new Int32Array(nV).fill(-1);
  rings.forEach((r, k) => ringOf.fill(k, base[k], base[k] + r.points.length / 3));
  const p = positions;
  for (let t = 0; t < triangles.length; t += 3) {
    const a = triangles[t], b = triangles[t + 1], c = triangles[t + 2];
    const k = ringOf[a] >= 0 ? ringOf[a] : ringOf[b] >= 0 ? ringOf[b] : ringOf[c];
    const ux = p[3 * b] - p[3 * a], uy = p[3 * b + 1] - p[3 * a + 1], uz = p[3 * b + 2] - p[3 * a + 2];
    const vx = p[3 * c] - p[3 * a], vy = p[3 * c + 1] - p[3 * a + 1], vz = p[3 * c + 2] - p[3 * a + 2];
    const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
    const cx = (p[3 * a] + p[3 * b] + p[3 * c]) / 3 - centre[k][0];
    const cy = (p[3 * a + 1] + p[3 * b + 1] + p[3 * c + 1]) / 3 - centre[k][1];
    const cz = (p[3 * a + 2] + p[3 * b + 2] + p[3 * c + 2]) / 3 - centre[k][2];
    flux += nx * cx + ny * cy + nz * cz;
  }
  if (flux < 0) {
    for (let t = 0; t < triangles.length; t += 3) {
      const b = triangles[t + 1];
      triangles[t + 1] = triangles[t + 2];
      triangles[t + 2] = b;
    }
  }
  return makeMesh(positions, triangles);
}

/** Number of points for a loop of length `length` at spacing `h` (at least `min`). */
export function ringCount(length: number, h: number, min = 3): number {
  return Math.max(min, Math.round(length / h));
}

/** Spacing between rings for near-equilateral triangles of edge `h`. */
export const ROW_SPACING = Math.sqrt(3) / 2;

/**
 * Points spaced evenly by arc length along the ellipse (a cos α, b sin α) in the
 * frame (centre, e1, e2), at parameters (i + phase)/n.
 */
export function ellipseRing(
  centre: ArrayLike<number>,
  e1: ArrayLike<number>,
  e2: ArrayLike<number>,
  a: number,
  b: number,
  n: number,
  phase: number,
): Float64Array {
  const samples = 512;
  const arc = new Float64Array(samples + 1);
  for (let s = 0; s < samples; s++) {
    const al = (2 * Math.PI * (s + 0.5)) / samples;
    arc[s + 1] = arc[s] + Math.hypot(a * Math.sin(al), b * Math.cos(al)) * ((2 * Math.PI) / samples);
  }
  const total = arc[samples];
  const out = new Float64Array(3 * n);
  let s = 0;
  for (let i = 0; i < n; i++) {
    const target = ((i + phase) / n) * total;
    while (s < samples - 1 && arc[s + 1] < target) s++;
    const f = (target - arc[s]) / (arc[s + 1] - arc[s]);
    const al = (2 * Math.PI * (s + f)) / samples;
    const ca = a * Math.cos(al), sb = b * Math.sin(al);
    for (let k = 0; k < 3; k++) out[3 * i + k] = centre[k] + ca * e1[k] + sb * e2[k];
  }
  return out;
}

/** Ramanujan's approximation of an ellipse's perimeter. */
export function ellipsePerimeter(a: number, b: number): number {
  const h = ((a - b) * (a - b)) / ((a + b) * (a + b));
  return Math.PI * (a + b) * (1 + (3 * h) / (10 + Math.sqrt(4 - 3 * h)));
}
