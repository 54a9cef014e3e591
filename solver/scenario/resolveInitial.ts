import type { Mesh } from '../mesh/Mesh.ts';
import type { ResolveContext } from './Problems.ts';
import type { ScenarioEnvironment } from './ResolvedScenario.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import type { FieldPlan } from './resolveFields.ts';
import { seededRandom } from '../linalg/seededRandom.ts';

export interface InitialPlan {
  /** the starting state, vertex-major (state[i·nS + s]) */
  initial: Float64Array;
  /** index of the homogeneous steady state asked for (initial.steadyState, default 0) */
  steadyIndex: number;
  /** that steady state where the parameters are constants and it is needed (closed form) */
  uniformSteady?: number[];
  /** per species started at a steady state that varies over the surface (parameters that are fields): that rest field */
  rest?: (Float64Array | undefined)[];
}

/**
 * The `initial` section: per species the homogeneous steady state (closed
 * form, per vertex where parameters vary), a number or a formula — or a
 * previous run's final state — then spots and seeded noise on top. Every
 * starting value must be finite.
 */
export function resolveInitial(ctx: ResolveContext, kin: KineticsPlan, fields: FieldPlan, mesh: Mesh, seed: number, env: ScenarioEnvironment): InitialPlan {
  const { problems } = ctx;
  const { model, species, parameterSpec } = kin;
  const n = mesh.positions.length / 3;
  const nS = species.length;
  const initial = new Float64Array(n * nS);
  const rest: (Float64Array | undefined)[] = [];
  const init = ctx.source.scenario.initial ?? {};
  const steadyIndex = init.steadyState ?? 0;
  const anyFieldParam = fields.parameters.some((p) => typeof p !== 'number');
  const steadyAt = (i: number): number[] | undefined => {
    if (!model?.steadyStates) return undefined;
    const p: Record<string, number> = {};
    Object.keys(parameterSpec).forEach((name, j) => {
      const v = fields.parameters[j];
      p[name] = typeof v === 'number' ? v : v[i];
    });
    return model.steadyStates(p)[steadyIndex];
  };
  const valuesSpec = init.values ?? 'steady';
  const wantsSteady = valuesSpec === 'steady' || Object.values(valuesSpec).includes('steady');
  let uniformSteady: number[] | undefined;
  if (wantsSteady) {
    if (!model?.steadyStates) {
      problems.add(['initial', 'values'], ownKineticsStart(species));
    } else {
      uniformSteady = steadyAt(0);
      const count = model.steadyStates(fields.constants).length;
      if (!uniformSteady) problems.add(['initial', init.steadyState !== undefined ? 'steadyState' : 'values'], `${model.title} has ${count} homogeneous steady state${count === 1 ? '' : 's'} for these parameters; steadyState ${steadyIndex} does not exist`);
    }
  }
  if (init.from !== undefined) {
    if (!env.loadState) problems.add(['initial', 'from'], 'starting from a previous run is not available here');
    else {
      try {
        const prev = env.loadState(init.from);
        for (let s = 0; s < nS; s++) {
          const v = prev.values[species[s]];
          if (!v) { problems.add(['initial', 'from'], `the previous run has no species "${species[s]}" (it has ${prev.species.join(', ')})`); break; }
          if (v.length !== n) { problems.add(['initial', 'from'], `the previous run has ${v.length} vertices, this mesh ${n}: start from a run on the same mesh`); break; }
          for (let i = 0; i < n; i++) initial[i * nS + s] = v[i];
        }
      } catch (e) {
        problems.add(['initial', 'from'], (e as Error).message);
      }
    }
  } else if (!problems.any) {
    for (let s = 0; s < nS; s++) {
      const v = valuesSpec === 'steady' ? 'steady' : valuesSpec[species[s]] ?? (wantsSteady ? 'steady' : undefined);
      if (v === undefined) {
        problems.add(['initial', 'values'], `no starting value for species "${species[s]}"`);
      } else if (v === 'steady') {
        for (let i = 0; i < n; i++) initial[i * nS + s] = anyFieldParam ? (steadyAt(i)?.[s] ?? NaN) : uniformSteady![s];
        if (anyFieldParam) {
          rest[s] = new Float64Array(n);
          for (let i = 0; i < n; i++) rest[s]![i] = initial[i * nS + s];
        }
      } else {
        const f = fields.fieldValue(v, ['initial', 'values', species[s]], fields.constants);
        if (f !== undefined) for (let i = 0; i < n; i++) initial[i * nS + s] = typeof f === 'number' ? f : f[i];
      }
    }
    if (valuesSpec !== 'steady') {
      for (const name of Object.keys(valuesSpec)) if (!species.includes(name)) problems.add(['initial', 'values', name], `"${name}" is not a species (${species.join(', ')})`);
    }
  }
  const rand = seededRandom(seed);
  if (init.spots) addSpots(ctx, init.spots, species, mesh, initial, rand);
  if (init.noise !== undefined) {
    const { amplitude: amp, species: which } = noiseTargets(init.noise, species);
    for (const name of which) if (!species.includes(name)) problems.add(['initial', 'noise', 'species'], `"${name}" is not a species (${species.join(', ')})`);
    const idx = which.map((name) => species.indexOf(name)).filter((s) => s >= 0);
    for (let i = 0; i < n; i++) for (const s of idx) initial[i * nS + s] += amp * (2 * rand() - 1);
  }
  problems.fail(ctx.file);
  for (let i = 0; i < initial.length; i++) {
    if (!Number.isFinite(initial[i])) {
      problems.add(['initial'], `the starting value of ${species[i % nS]} at vertex ${Math.floor(i / nS)} is ${initial[i]}; check the formulas and parameters`);
      problems.fail(ctx.file);
    }
  }
  return { initial, steadyIndex, uniformSteady, rest };
}

type Spots = NonNullable<NonNullable<ResolveContext['source']['scenario']['initial']>['spots']>;

/** Set the spots' values within `radius` (straight-line distance) of each centre: random vertices, given points or vertices. */
function addSpots(ctx: ResolveContext, sp: Spots, species: readonly string[], mesh: Mesh, initial: Float64Array, rand: () => number): void {
  const { problems } = ctx;
  const n = mesh.positions.length / 3;
  const nS = species.length;
  const centres: number[] = [];
  const given = [sp.count !== undefined, sp.centres !== undefined, sp.vertices !== undefined].filter(Boolean).length;
  if (given !== 1) problems.add(['initial', 'spots'], 'give exactly one of count, centres or vertices');
  for (const name of Object.keys(sp.values)) if (!species.includes(name)) problems.add(['initial', 'spots', 'values', name], `"${name}" is not a species (${species.join(', ')})`);
  if (sp.vertices) sp.vertices.forEach((v, j) => { if (v >= n) problems.add(['initial', 'spots', 'vertices', j], `vertex ${v} does not exist (the mesh has ${n}, numbered from 0)`); else centres.push(v); });
  if (sp.count !== undefined) for (let j = 0; j < sp.count; j++) centres.push(Math.min(n - 1, Math.floor(rand() * n)));
  const p = mesh.positions;
  for (const c of sp.centres ?? []) {
    let best = 0, bestD = Infinity;
    for (let i = 0; i < n; i++) {
      const d = (p[3 * i] - c[0]) ** 2 + (p[3 * i + 1] - c[1]) ** 2 + (p[3 * i + 2] - c[2]) ** 2;
      if (d < bestD) { bestD = d; best = i; }
    }
    centres.push(best);
  }
  const r2 = sp.radius * sp.radius;
  for (const c of centres) {
    const cx = p[3 * c], cy = p[3 * c + 1], cz = p[3 * c + 2];
    for (let i = 0; i < n; i++) {
      if ((p[3 * i] - cx) ** 2 + (p[3 * i + 1] - cy) ** 2 + (p[3 * i + 2] - cz) ** 2 > r2) continue;
      for (const [name, value] of Object.entries(sp.values)) {
        const s = species.indexOf(name);
        if (s >= 0) initial[i * nS + s] = value;
      }
    }
  }
}

/** The problem of your own kinetics started at "steady" (found early with the other requirements, again here). */
export const ownKineticsStart = (species: readonly string[]) => `your own kinetics has no closed-form steady state here: give a starting value per species (values: {${species.map((s) => `${s}: 1`).join(', ')}})`;

/** The starting noise's amplitude and the species it goes on (all of them unless the scenario names some). */
export function noiseTargets(noise: number | { amplitude: number; species?: string[] }, species: readonly string[]): { amplitude: number; species: readonly string[] } {
  return typeof noise === 'number' ? { amplitude: noise, species } : { amplitude: noise.amplitude, species: noise.species ?? species };
}
