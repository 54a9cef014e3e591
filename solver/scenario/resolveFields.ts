import type { FieldValue } from './Scenario.ts';
import type { ResolveContext } from './Problems.ts';
import type { LoadedMesh } from './ResolvedScenario.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import { FormulaError } from '../kinetics/FormulaError.ts';
import { evaluateSurfaceFormula } from '../kinetics/surfaceField.ts';
import { parseFormula } from '../kinetics/parseFormula.ts';

type Path = (string | number)[];

/** Parameters and diffusion on the mesh: constants, or per-vertex fields. */
export interface FieldPlan {
  /** parameters that are single numbers, by name (formulas of fields may use them) */
  constants: Record<string, number>;
  /** one per kinetics parameter, in its order */
  parameters: (number | Float64Array)[];
  diffusionSpec: Record<string, FieldValue>;
  /** one per species, in its order */
  diffusion: (number | Float64Array)[];
  /** a number, a formula evaluated on the mesh, or the mesh's per-vertex data; undefined (and a problem recorded) when it cannot be */
  fieldValue(value: FieldValue, path: Path, constants: Record<string, number>): number | Float64Array | undefined;
  /** the mesh's per-vertex data of that name, or undefined with a problem naming those it has */
  vertexDataOf(name: string, path: Path): Float64Array | undefined;
}

/**
 * The formulas of parameter, diffusion and initial-value fields, checked for
 * what needs no mesh: that they parse and name only x, y, z (t for growth) and
 * the kinetics' parameters. Resolution on the mesh evaluates them later.
 */
export function checkFieldFormulas(ctx: ResolveContext, kin: KineticsPlan): void {
  const sc = ctx.source.scenario;
  const names = Object.keys(kin.parameterSpec);
  const space = new Set(['x', 'y', 'z', ...names]);
  const check = (text: unknown, path: Path, symbols = space) => {
    if (typeof text !== 'string' || text === 'steady') return;
    try {
      parseFormula(text, symbols);
    } catch (e) {
      if (!(e instanceof FormulaError)) throw e;
      ctx.problems.add(path, e.message);
    }
  };
  for (const [name, v] of Object.entries(kin.parameterSpec)) check(v, ['kinetics', 'parameters', name], new Set(['x', 'y', 'z', ...names.filter((n) => n !== name)]));
  for (const [name, v] of Object.entries(sc.diffusion ?? {})) check(v, ['diffusion', name]);
  const values = sc.initial?.values;
  if (values && typeof values === 'object') for (const [name, v] of Object.entries(values)) check(v, ['initial', 'values', name]);
  const timed = new Set([...space, 't']);
  for (const key of ['speed', 'expansion'] as const) check(sc.growth?.[key], ['growth', key], timed);
}

/** Diffusion keys that name no species (checked before the mesh is built). */
export function checkDiffusionNames(ctx: ResolveContext, species: readonly string[]): void {
  for (const name of Object.keys(ctx.source.scenario.diffusion ?? {})) {
    if (species.length && !species.includes(name)) ctx.problems.add(['diffusion', name], `"${name}" is not a species (${species.join(', ')})`);
  }
}

/**
 * Parameter values (constants first: field formulas may use them) and the
 * diffusion of every species (the model's default, which may name parameters,
 * unless the scenario gives one), each a number or a per-vertex field.
 */
export function resolveFields(ctx: ResolveContext, kin: KineticsPlan, loaded: LoadedMesh): FieldPlan {
  const { problems } = ctx;
  const sc = ctx.source.scenario;
  const mesh = loaded.mesh;
  const n = mesh.positions.length / 3;
  const vertexDataOf = (name: string, path: Path): Float64Array | undefined => {
    const data = loaded.vertexData[name];
    if (!data) {
      const names = Object.keys(loaded.vertexData);
      problems.add(path, `the mesh has no per-vertex value "${name}"; ${names.length ? `it has ${names.join(', ')}` : 'it carries no per-vertex values (PLY files can, as extra vertex properties)'}`);
    }
    return data;
  };
  const fieldValue = (value: FieldValue, path: Path, constants: Record<string, number>): number | Float64Array | undefined => {
    if (typeof value === 'number') return value;
    if (typeof value === 'string') {
      try {
        return evaluateSurfaceFormula(value, mesh, constants);
      } catch (e) {
        if (!(e instanceof FormulaError)) throw e;
        problems.add(path, e.message);
        return undefined;
      }
    }
    return vertexDataOf(value.vertexData, path);
  };

  const constants: Record<string, number> = {};
  for (const [name, v] of Object.entries(kin.parameterSpec)) if (typeof v === 'number') constants[name] = v;
  const parameters: (number | Float64Array)[] = [];
  for (const [name, v] of Object.entries(kin.parameterSpec)) {
    const path = ['kinetics', 'parameters', name];
    const r = typeof v === 'number' ? v : fieldValue(v, path, constants);
    if (r === undefined) { parameters.push(0); continue; }
    const bad = firstNonFinite(r);
    if (bad !== undefined) {
      problems.add(path, typeof r === 'number' ? `must be a finite number, got ${r}` : `is ${r[bad]} at vertex ${bad}: a parameter must be finite everywhere`);
      parameters.push(0);
      continue;
    }
    if (typeof r === 'number') constants[name] = r;
    parameters.push(r);
  }

  const diffusionSpec: Record<string, FieldValue> = {};
  const diffusion: (number | Float64Array)[] = [];
  for (const s of kin.species) {
    const v = sc.diffusion?.[s] ?? kin.model?.diffusion[s];
    const path = sc.diffusion?.[s] !== undefined ? ['diffusion', s] : ['kinetics'];
    if (v === undefined) {
      problems.add(['diffusion'], missingDiffusion(s));
      diffusion.push(0);
      continue;
    }
    diffusionSpec[s] = v;
    const d = fieldValue(v, path, constants);
    if (d === undefined) { diffusion.push(0); continue; }
    if (typeof d === 'number') {
      if (!(d >= 0) || !Number.isFinite(d)) problems.add(path, `diffusion of ${s} must be ≥ 0, got ${d}`);
    } else {
      let worst = -1;
      for (let i = 0; i < n; i++) if (!(d[i] >= 0) || !Number.isFinite(d[i])) { worst = i; break; }
      if (worst >= 0) problems.add(path, `diffusion of ${s} must be ≥ 0 everywhere; it is ${d[worst]} at vertex ${worst}`);
    }
    diffusion.push(d);
  }
  return { constants, parameters, diffusionSpec, diffusion, fieldValue, vertexDataOf };
}

/** Index of the first value that is not finite (0 for a number), or undefined. */
function firstNonFinite(v: number | Float64Array): number | undefined {
  if (typeof v === 'number') return Number.isFinite(v) ? undefined : 0;
  for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i])) return i;
  return undefined;
}

/** The problem of a species without a diffusion coefficient (found early for your own kinetics, again here). */
export const missingDiffusion = (s: string) => `no diffusion coefficient for species "${s}" (write ${s}: 0 for one that does not move)`;
