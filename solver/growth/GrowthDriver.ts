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
  private readonly next: Float64Array;

  constructor(law: GrowthLaw, vertexCount: number, tolerance = 1e-3, startStep = 0, private readonly maxInterval = 1000) {
    this.law = law;
    this.tolerance = tolerance;
    this.lastUpdate = startStep;
    this.nextUpdate = startStep;
    this.next = new Float64Array(3 * vertexCount);
  }

  /** Steps until the next update: relative area change over one step, extrapolated. */
  private interval(surface: Mesh, step: number, dt: number): number {
    const probe = new Float64Array(surface.positions.length);
    this.law.advance(surface, step * dt, (step + 1) * dt, probe);
    const m0 = lumpedMass(surface);
    const m1 = lumpedMass({ positions: probe, triangles: surface.triangles });
    let change = 0;
    for (let i = 0; i < m0.length; i++) change = Math.max(change, Math.abs(m1[i] / m0[i] - 1));
    return Math.max(1, Math.min(this.maxInterval, change > 0 ? Math.floor(this.tolerance / change) : this.maxInterval));
  }

  /** Plan the first update from the current surface (call once before stepping). */
  start(stepper: ReactionDiffusionStepper, step: number, dt: number): void {
    this.nextUpdate = step + this.interval(stepper.surface, step, dt);
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
    this.law.advance(surface, t0, t1, this.next);
    const positions = this.next.slice();
    checkTriangles(surface, positions, t1);
    stepper.setGeometry(positions);
    this.lastUpdate = step;
    this.updates++;
    this.nextUpdate = step + this.interval(stepper.surface, step, dt);
    return true;
  }
}

/** Refuse a move that inverts a triangle or shrinks it to (almost) nothing. */
export function checkTriangles(before: Mesh, after: Float64Array, time: number): void {
  const tri = before.triangles, p = before.positions, q = after;
  for (let t = 0; t < tri.length; t += 3) {
    const a = 3 * tri[t], b = 3 * tri[t + 1], c = 3 * tri[t + 2];
    const n0 = cross(p, a, b, c), n1 = cross(q, a, b, c);
    const area0 = Math.hypot(...n0), area1 = Math.hypot(...n1);
    const dot = n0[0] * n1[0] + n0[1] * n1[1] + n0[2] * n1[2];
    const why = !Number.isFinite(area1) ? 'undefined' : dot <= 0 ? 'turn over (inverted)' : area1 < COLLAPSE_RATIO * area0 ? 'collapse' : undefined;
    if (why) {
      const where: [number, number, number] = [(q[a] + q[b] + q[c]) / 3, (q[a + 1] + q[b + 1] + q[c + 1]) / 3, (q[a + 2] + q[b + 2] + q[c + 2]) / 3];
      throw new GrowthDegenerationError(time, t / 3, where, why);
    }
  }
}

function cross(p: Float64Array, a: number, b: number, c: number): [number, number, number] {
  const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
  const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
  return [uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx];
}
