import { seededRandom } from '../linalg/seededRandom.ts';
import type { SweepSpec, SweepAxis, SweepRange } from './Sweep.ts';

/** One point of a sweep: the value of every varied path. */
export type SweepPoint = Record<string, unknown>;

/** Numbers of a sweep kept to 12 significant digits, so 0.1 + 0.2 is stored (and hashed) as 0.3. */
const tidy = (x: number) => Number(x.toPrecision(12));

function isRange(axis: SweepAxis): axis is SweepRange {
  return !Array.isArray(axis);
}

/** The value at fraction q ∈ [0, 1] of a range (linear or logarithmic). */
function rangeValue(r: SweepRange, q: number): number {
  const v = r.scale === 'log' ? Math.exp(Math.log(r.from) + q * (Math.log(r.to) - Math.log(r.from))) : r.from + q * (r.to - r.from);
  return r.integer ? Math.round(v) : tidy(v);
}

/** The grid values of one axis. */
export function axisValues(axis: SweepAxis): unknown[] {
  if (!isRange(axis)) return axis;
  const steps = axis.steps ?? 2;
  if (steps === 1) return [axis.integer ? Math.round(axis.from) : tidy(axis.from)];
  return Array.from({ length: steps }, (_, i) => rangeValue(axis, i / (steps - 1)));
}

/** Problems with a sweep's axes that the schema cannot see (empty when there are none). */
export function sweepAxisProblems(spec: SweepSpec): { path: string; message: string }[] {
  const out: { path: string; message: string }[] = [];
  const design = spec.design ?? 'grid';
  if (design !== 'grid' && spec.samples === undefined) out.push({ path: 'samples', message: `a ${design} design needs samples: how many points to draw` });
  if (design === 'grid' && spec.samples !== undefined) out.push({ path: 'samples', message: 'a grid takes every combination of the axes: samples is only for random and latin-hypercube designs' });
  for (const [path, axis] of Object.entries(spec.vary)) {
    if (!isRange(axis)) continue;
    if (axis.scale === 'log' && !(axis.from > 0 && axis.to > 0)) out.push({ path: `vary.${path}`, message: `a log range needs from and to above 0, got ${axis.from} and ${axis.to}` });
    if (design === 'grid' && axis.steps === undefined) out.push({ path: `vary.${path}`, message: 'a range in a grid needs steps: how many values from "from" to "to"' });
  }
  return out;
}

/**
 * Expand a sweep into its points, in a fixed order: a grid varies the first
 * axis slowest (like nested loops in the order written); random designs draw
 * from the seeded generator, ranges uniformly (or log-uniformly), lists by
 * picking an element. A Latin hypercube puts exactly one point in each of
 * `samples` equal strata of every axis (McKay, Beckman & Conover 1979).
 */
export function expandSweep(spec: SweepSpec): SweepPoint[] {
  const paths = Object.keys(spec.vary);
  const axes = paths.map((p) => spec.vary[p]);
  const design = spec.design ?? 'grid';
  if (design === 'grid') {
    const values = axes.map(axisValues);
    const total = values.reduce((a, v) => a * v.length, 1);
    const points: SweepPoint[] = [];
    for (let k = 0; k < total; k++) {
      const point: SweepPoint = {};
      let rest = k;
      for (let a = axes.length - 1; a >= 0; a--) {
        point[paths[a]] = values[a][rest % values[a].length];
        rest = Math.floor(rest / values[a].length);
      }
      points.push(Object.fromEntries(paths.map((p) => [p, point[p]])));
    }
    return points;
  }
  const n = spec.samples ?? 1;
  const random = seededRandom(spec.seed ?? 1);
  // per axis, the fraction q ∈ [0, 1) of each sample
  const fractions = axes.map(() => new Float64Array(n));
  for (let a = 0; a < axes.length; a++) {
    if (design === 'random') {
      for (let i = 0; i < n; i++) fractions[a][i] = random();
    } else {
      const order = Array.from({ length: n }, (_, i) => i);
      for (let i = n - 1; i > 0; i--) {
        const j = Math.floor(random() * (i + 1));
        [order[i], order[j]] = [order[j], order[i]];
      }
      for (let i = 0; i < n; i++) fractions[a][i] = (order[i] + random()) / n;
    }
  }
  return Array.from({ length: n }, (_, i) =>
    Object.fromEntries(paths.map((p, a) => {
      const axis = axes[a], q = fractions[a][i];
      return [p, isRange(axis) ? rangeValue(axis, q) : axis[Math.min(axis.length - 1, Math.floor(q * axis.length))]];
    })),
  );
}

/**
 * A copy of `base` with every path of `point` set. Paths are dotted; a
 * numeric segment indexes a list. Missing mappings on the way are created;
 * a path through a value that is not a mapping or list is an error.
 */
export function applySweepPoint<T extends object>(base: T, point: SweepPoint): T {
  const out = structuredClone(base) as Record<string, unknown>;
  for (const [path, value] of Object.entries(point)) {
    const parts = path.split('.');
    let node: Record<string, unknown> | unknown[] = out;
    for (let i = 0; i < parts.length - 1; i++) {
      const key = parts[i];
      let next = (node as Record<string, unknown>)[key];
      if (next === undefined) {
        next = /^\d+$/.test(parts[i + 1]) ? [] : {};
        (node as Record<string, unknown>)[key] = next;
      }
      if (next === null || typeof next !== 'object') {
        throw new Error(`vary.${path}: ${parts.slice(0, i + 1).join('.')} is ${JSON.stringify(next)} in the scenario, not a mapping or list, so ${parts[i + 1]} cannot be set inside it`);
      }
      node = next as Record<string, unknown>;
    }
    (node as Record<string, unknown>)[parts[parts.length - 1]] = structuredClone(value);
  }
  return out as T;
}

/** The paths whose value differs between points (a one-value axis only sets a value). */
export function varyingPaths(points: readonly SweepPoint[]): string[] {
  if (!points.length) return [];
  return Object.keys(points[0]).filter((p) => new Set(points.map((q) => JSON.stringify(q[p]))).size > 1);
}

/** A value for a caption: numbers to 4 digits, a mapping by its shape or model name when it has one. */
function captionValue(v: unknown): string {
  if (typeof v === 'number') return String(Number(v.toPrecision(4)));
  if (typeof v === 'string') return v;
  if (v && typeof v === 'object' && !Array.isArray(v)) {
    const named = (v as Record<string, unknown>).shape ?? (v as Record<string, unknown>).model ?? (v as Record<string, unknown>).law;
    if (typeof named === 'string') return named;
  }
  return JSON.stringify(v);
}

/** A short caption of a point, e.g. `F=0.03 k=0.062` or `mesh=torus` (last path segment of each path shown). */
export function pointLabel(point: SweepPoint, shown: readonly string[] = Object.keys(point)): string {
  return Object.entries(point)
    .filter(([p]) => shown.includes(p))
    .map(([p, v]) => `${p.split('.').pop()}=${captionValue(v)}`)
    .join(' ');
}
