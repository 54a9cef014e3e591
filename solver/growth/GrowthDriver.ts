import type { Mesh } from '../mesh/Mesh.ts';
import type { ReactionDiffusionStepper } from '../integrate/ReactionDiffusionStepper.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import type { GrowthLaw } from './GrowthLaw.ts';

/** The surface folded or collapsed: where and when, for the user. */
export class GrowthDegenerationError extends Error {
  constructor(readonly time: number, readonly triangle: number, readonly where: [number, number, number], why: string) {
    super(`growth made triangle ${triangle} ${why} at t=${time.toPrecision(6)}, near (${where.map((x) => x.toPrecision(4)).join(', ')}): the growth law folds the surface there; slow it down or smooth its field`);
    this.name = 'GrowthDegenerationError';
  }
}

/** Smallest tolerated ratio of a triangle's area to its area before a geometry update. */
const COLLAPSE_RATIO = 1e-3;

/**
 * Moves the surface of a run: decides when the geometry is brought up to date
 * (often enough that no vertex's area changes by more than `tolerance`
 * relative between updates, never less than once per `maxInterval` steps),
 * checks the new triangles, and hands the positions to the stepper.
 */
export class GrowthDriver {
  readonly law: GrowthLaw;
  readonly tolerance: number;
  /** step of the last geometry update, and of the next one */
  lastUpdate: number;
  nextUpdate: number;
  updates = 0;
  /** two buffers the law writes the moved surface into in turn (the stepper keeps the other one as its surface) */
  private readonly buffers: [Float64Array, Float64Array];
  private nextBuffer = 0;

  constructor(law: GrowthLaw, vertexCount: number, tolerance = 1e-3, startStep = 0, private readonly maxInterval = 1000) {
    this.law = law;
    this.tolerance = tolerance;
    this.lastUpdate = startStep;
    this.nextUpdate = startStep;
    this.buffers = [new Float64Array(3 * vertexCount), new Float64Array(3 * vertexCount)];
  }

  /** Steps until the next update, for a relative area change per step `change`. */
  private interval(change: number): number {
    return Math.max(1, Math.min(this.maxInterval, change > 0 ? Math.floor(this.tolerance / change) : this.maxInterval));
  }

  /** Plan the first update from the current surface (call once before stepping): the area change over one step, extrapolated. */
  start(stepper: ReactionDiffusionStepper, step: number, dt: number): void {
    const surface = stepper.surface;
    const probe = this.buffers[this.nextBuffer];
    this.law.advance(surface, step * dt, (step + 1) * dt, probe);
    const m0 = stepper.mass;
    const m1 = lumpedMass({ positions: probe, triangles: surface.triangles });
    let change = 0;
    for (let i = 0; i < m0.length; i++) change = Math.max(change, Math.abs(m1[i] / m0[i] - 1));
    this.nextUpdate = step + this.interval(change);
  }

  /**
   * If an update is due at `step` (or `force`d, as at output times, so frames
   * show the surface at their time), move the surface from the last update's time
   * to step·dt, check it and give it to the stepper. Returns true if it moved.
   */
  maybeUpdate(stepper: ReactionDiffusionStepper, step: number, dt: number, force = false): boolean {
    if (step < this.nextUpdate && !(force && step > this.lastUpdate)) return false;
    const surface = stepper.surface;
    const t0 = this.lastUpdate * dt, t1 = step * dt;
    const positions = this.buffers[this.nextBuffer];
    if (positions === surface.positions) throw new Error('GrowthDriver: the surface is held in the buffer the next move goes into');
    this.law.advance(surface, t0, t1, positions);
    // the stepper's sweep finds a bad move; checkTriangles then names the triangle
    if (!stepper.checkMove(positions, COLLAPSE_RATIO)) checkTriangles(surface, positions, t1);
    const change = stepper.setGeometry(positions);
    this.nextBuffer = 1 - this.nextBuffer;
    // the next update when areas, changing as fast as they did since the last one, will have changed by the tolerance
    const steps = step - this.lastUpdate;
    this.lastUpdate = step;
    this.updates++;
    this.nextUpdate = step + this.interval(change / steps);
    return true;
  }
}

/** Refuse a move that inverts a triangle or shrinks it to (almost) nothing. */
export function checkTriangles(before: Mesh, after: Float64Array, time: number): void {
  const tri = before.triangles, p = before.positions, q = after;
  for (let t = 0; t < tri.length; t += 3) {
    const a = 3 * tri[t], b = 3 * tri[t + 1], c = 3 * tri[t + 2];
    // normals (twice the area vectors) before and after
    let ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
    let vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
    const n0x = uy * vz - uz * vy, n0y = uz * vx - ux * vz, n0z = ux * vy - uy * vx;
    ux = q[b] - q[a]; uy = q[b + 1] - q[a + 1]; uz = q[b + 2] - q[a + 2];
    vx = q[c] - q[a]; vy = q[c + 1] - q[a + 1]; vz = q[c + 2] - q[a + 2];
    const n1x = uy * vz - uz * vy, n1y = uz * vx - ux * vz, n1z = ux * vy - uy * vx;
    const area0 = Math.sqrt(n0x * n0x + n0y * n0y + n0z * n0z), area1 = Math.sqrt(n1x * n1x + n1y * n1y + n1z * n1z);
    const dot = n0x * n1x + n0y * n1y + n0z * n1z;
    // the usual case decided with no branch taken: finite, same side, not collapsed
    if (dot > 0 && area1 >= COLLAPSE_RATIO * area0 && area1 < Infinity) continue;
    const [h0, h1] = [Math.hypot(n0x, n0y, n0z), Math.hypot(n1x, n1y, n1z)]; // without overflow, for huge coordinates
    const why = !Number.isFinite(h1) ? 'undefined' : dot <= 0 ? 'turn over (inverted)' : h1 < COLLAPSE_RATIO * h0 ? 'collapse' : undefined;
    if (why) {
      const where: [number, number, number] = [(q[a] + q[b] + q[c]) / 3, (q[a + 1] + q[b + 1] + q[c + 1]) / 3, (q[a + 2] + q[b + 2] + q[c + 2]) / 3];
      throw new GrowthDegenerationError(time, t / 3, where, why);
    }
  }
}
