import type { Mesh } from '../../solver/mesh/Mesh.ts';
import type { ShapeDefinition } from './ShapeDefinition.ts';
import { DEFAULT_SHAPE_VERTICES, MAX_SHAPE_VERTICES } from '../../solver/defaults.ts';
import { sphere } from './sphere.ts';
import { ellipsoid } from './ellipsoid.ts';
import { torus } from './torus.ts';
import { capsule } from './capsule.ts';
import { dome } from './dome.ts';
import { patch } from './patch.ts';
import { limbBud } from './limbBud.ts';
import { spiralShell } from './spiralShell.ts';
import { scanBud } from './scanBud.ts';

export type { ShapeDefinition, ShapeParameter } from './ShapeDefinition.ts';

/** Every built-in shape, by name. */
export const SHAPES: Readonly<Record<string, ShapeDefinition>> = Object.fromEntries(
  [sphere, ellipsoid, torus, capsule, dome, patch, limbBud, spiralShell, scanBud].map((s) => [s.name, s]),
);

/** Vertex count a shape aims for when none is asked for, and the largest target accepted (memory guard, ~0.5 GB of operators). */
export { DEFAULT_SHAPE_VERTICES, MAX_SHAPE_VERTICES } from '../../solver/defaults.ts';

export interface ShapeRequest {
  shape: string;
  params?: Record<string, number>;
  vertices?: number;
}

/**
 * Build a named shape. Unknown shapes or parameters, values out of range and
 * inconsistent combinations are reported together in one error.
 */
export function buildShape(request: ShapeRequest): { mesh: Mesh; params: Record<string, number>; vertices: number } {
  const def = Object.hasOwn(SHAPES, request.shape) ? SHAPES[request.shape] : undefined;
  if (!def) {
    throw new Error(`unknown shape "${request.shape}"; built-in shapes are: ${Object.keys(SHAPES).join(', ')}`);
  }
  const params = resolveShapeParams(def, request.params ?? {});
  const vertices = request.vertices ?? DEFAULT_SHAPE_VERTICES;
  if (!Number.isFinite(vertices) || vertices < 4 || vertices > MAX_SHAPE_VERTICES) {
    throw new Error(`shape "${def.name}": vertices must be a number from 4 to ${MAX_SHAPE_VERTICES}, got ${vertices}`);
  }
  return { mesh: def.build(params, vertices), params, vertices };
}

/** Fill in defaults and check every parameter; throws one error listing all problems. */
export function resolveShapeParams(def: ShapeDefinition, given: Record<string, number>): Record<string, number> {
  const problems: string[] = [];
  for (const key of Object.keys(given)) {
    if (!Object.hasOwn(def.parameters, key)) {
      problems.push(`unknown parameter "${key}" (parameters of ${def.name}: ${Object.keys(def.parameters).join(', ')})`);
    }
  }
  const params: Record<string, number> = {};
  for (const [key, spec] of Object.entries(def.parameters)) {
    const v = key in given ? given[key] : spec.default;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      problems.push(`${key} must be a finite number, got ${String(v)}`);
      continue;
    }
    if (spec.integer && !Number.isInteger(v)) problems.push(`${key} must be a whole number, got ${v}`);
    if (spec.min !== undefined && (spec.exclusiveMin ? v <= spec.min : v < spec.min)) {
      problems.push(`${key} must be ${spec.exclusiveMin ? '>' : '≥'} ${spec.min}, got ${v}`);
    }
    if (spec.max !== undefined && v > spec.max) problems.push(`${key} must be ≤ ${spec.max}, got ${v}`);
    params[key] = v;
  }
  if (problems.length === 0 && def.check) {
    const msg = def.check(params);
    if (msg) problems.push(msg);
  }
  if (problems.length > 0) throw new Error(`shape "${def.name}": ${problems.join('; ')}`);
  return params;
}
