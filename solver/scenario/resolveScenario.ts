import type { Mesh } from '../mesh/Mesh.ts';
import type { Scenario, FieldValue, MeshSpec } from './Scenario.ts';
import type { ScenarioSource } from './parseScenario.ts';
import { pathText, sortByLine } from './parseScenario.ts';
import { ScenarioError, closestName, type ScenarioProblem } from './ScenarioError.ts';
import { MODELS } from '../kinetics/models/index.ts';
import type { KineticsModel } from '../kinetics/KineticsModel.ts';
import { compileKinetics, KineticsError, type CompiledKinetics } from '../kinetics/compileKinetics.ts';
import { FormulaError } from '../kinetics/FormulaError.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import { systemExplicitLimit, type ExplicitStepLimit } from '../integrate/explicitStepLimit.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { seededRandom } from '../linalg/seededRandom.ts';
import { numericalSteadyStates } from '../analysis/steadyStates.ts';
import { smallMatrixEigenvalues } from '../analysis/smallMatrixEigenvalues.ts';
import { turingAnalysis } from '../analysis/dispersion.ts';
import { COLORMAP_NAMES, type ColormapName } from '../io/colormap.ts';
import { evaluateSurfaceFormula, compileSpaceTimeFormula } from '../kinetics/surfaceField.ts';
import type { GrowthLaw } from '../growth/GrowthLaw.ts';
import { affineGrowth } from '../growth/affineGrowth.ts';
import { normalGrowth, type VertexSpeed } from '../growth/normalGrowth.ts';
import { keyframeGrowth } from '../growth/keyframeGrowth.ts';
import { mapOntoSurface } from '../growth/mapOntoSurface.ts';
import { prolongField, type Refinement } from '../mesh/Refinement.ts';

/** What a mesh loader hands back (Node reads files; the viewer builds shapes in a worker). */
export interface LoadedMesh {
  mesh: Mesh;
  vertexData: Record<string, Float64Array>;
  /** how the mesh was made, for the record */
  source: Record<string, unknown>;
  notes: string[];
}

export interface ScenarioEnvironment {
  /** build or read the mesh; throw an Error whose message says what is wrong */
  loadMesh(spec: MeshSpec): LoadedMesh;
  /** a previous run's final state, by species name (for `initial.from`) */
  loadState?(from: string): { species: string[]; values: Record<string, Float64Array> };
}

export interface AnalysisPlan {
  species: string;
  threshold: 'otsu' | 'mid-range' | number;
  modes: number;
}

/** Default number of surface modes for the per-frame spectrum, on meshes up to AUTO_SPECTRUM_VERTICES. */
export const AUTO_SPECTRUM_MODES = 40;
export const AUTO_SPECTRUM_VERTICES = 50_000;

export interface GrowthPlan {
  /** builds the law on a reference surface: the initial one, or its refinement through `refinements` */
  makeLaw(reference: Float64Array, refinements: readonly Refinement[]): GrowthLaw;
  description: string;
  tolerance: number;
  /** centre of the scaling laws (given, or the area centroid) */
  centre?: [number, number, number];
  refine?: { edgeGrowth: number; maxEdge: number; maxVertices: number };
}

export interface OutputPlan {
  /** formats written besides PLY for every frame and the final state */
  formats: ('glb' | 'obj' | 'csv')[];
  every: number;
  everySteps: number;
  colour: string;
  colormap: ColormapName;
  range: [number, number] | 'frame';
  frames: boolean;
}

/** A scenario with every default filled in and everything built that a run needs. */
export interface ResolvedScenario {
  name: string;
  seed: number;
  mesh: Mesh;
  meshSource: Record<string, unknown>;
  meshNotes: string[];
  model: string;
  kineticsModel?: KineticsModel;
  species: string[];
  reactions: Record<string, string>;
  parameters: Record<string, FieldValue>;
  diffusion: Record<string, FieldValue>;
  kinetics: CompiledKinetics;
  system: ReactionDiffusionSystem;
  initial: Float64Array;
  scheme: 'imex' | 'explicit';
  dt: number;
  end: number;
  steps: number;
  steadyState?: number;
  solver: 'cg' | 'cholesky';
  tolerance: number;
  explicitLimit?: ExplicitStepLimit;
  output: OutputPlan;
  analysis: AnalysisPlan;
  growth?: GrowthPlan;
  warnings: string[];
  /** the resolved scenario as plain data, for record.json */
  summary: Record<string, unknown>;
}

/** Collects problems with their place in the file; `fail` throws them all. */
class Problems {
  readonly list: ScenarioProblem[] = [];
  constructor(private readonly source: ScenarioSource) {}
  add(path: (string | number)[], message: string): void {
    this.list.push({ path: pathText(path), message, ...this.source.locate(path) });
  }
  fail(file: string): void {
    if (this.list.length) throw new ScenarioError(file, sortByLine(this.list));
  }
}

const DEFAULT_SEED = 1;
/**
 * `solver: auto` factorises M + dt·D·K once (Cholesky: cost independent of the
 * conditioning, ~0.7 kB per vertex per distinct D) only on meshes up to this
 * size and only when Jacobi-CG would need many iterations, i.e. when
 * dt·D·λ_max(M⁻¹K) exceeds AUTO_CHOLESKY_STIFFNESS (CG iterations grow like
 * its square root); otherwise warm-started CG is faster and needs ~200 bytes
 * per vertex.
 */
export const AUTO_CHOLESKY_VERTICES = 60_000;
export const AUTO_CHOLESKY_STIFFNESS = 100;

/**
 * Check a parsed scenario against the models, formulas and mesh, fill in
 * defaults and build the system, initial state and time stepping plan.
 * Throws a ScenarioError listing every problem found with its path and line.
 */
export function resolveScenario(source: ScenarioSource, file: string, env: ScenarioEnvironment): ResolvedScenario {
  const sc: Scenario = source.scenario;
  const problems = new Problems(source);
  const warnings: string[] = [];
  if (sc.sweep) warnings.push(`the sweep section is not used by a single run: the scenario runs as written; expand the sweep with placode sweep plan ${file} --out DIR`);

  // ---- kinetics (checked before the mesh: cheap, and most mistakes are here)
  const k = sc.kinetics;
  let model: KineticsModel | undefined;
  let species: string[] = [];
  let reactions: Record<string, string> = {};
  const parameterSpec: Record<string, FieldValue> = {};
  if (k.model !== undefined) {
    model = MODELS[k.model];
    if (!model) {
      const hint = closestName(k.model, Object.keys(MODELS));
      problems.add(['kinetics', 'model'], `unknown model "${k.model}"${hint ? ` (did you mean "${hint}"?)` : ''}; built-in models: ${Object.keys(MODELS).join(', ')}, or give species and reactions for your own`);
    } else {
      if (k.species || k.reactions) problems.add(['kinetics', k.species ? 'species' : 'reactions'], `give either a built-in model or your own species and reactions, not both`);
      species = [...model.species];
      reactions = { ...model.reactions };
      for (const [name, p] of Object.entries(model.parameters)) parameterSpec[name] = p.default;
      for (const [name, v] of Object.entries(k.parameters ?? {})) {
        if (!(name in model.parameters)) {
          const hint = closestName(name, Object.keys(model.parameters));
          problems.add(['kinetics', 'parameters', name], `${model.title} has no parameter "${name}"${hint ? ` (did you mean "${hint}"?)` : ''}; its parameters: ${Object.keys(model.parameters).join(', ')}`);
        } else parameterSpec[name] = v;
      }
    }
  } else {
    if (!k.species) problems.add(['kinetics'], 'name a built-in model (model: gray-scott, …) or list your own species and reactions');
    else if (!k.reactions) problems.add(['kinetics'], 'missing "reactions": a rate formula for each species');
    species = k.species ?? [];
    reactions = k.reactions ?? {};
    Object.assign(parameterSpec, k.parameters ?? {});
  }
  let kinetics: CompiledKinetics | undefined;
  if (species.length && problems.list.length === 0) {
    try {
      kinetics = compileKinetics(species, reactions, Object.keys(parameterSpec));
    } catch (e) {
      if (!(e instanceof KineticsError)) throw e;
      for (const p of e.problems) {
        const [kind, name] = p.key.split('.');
        const path = kind === 'reactions' ? ['kinetics', 'reactions', name] : kind === 'parameters' ? ['kinetics', 'parameters', name] : ['kinetics', 'species'];
        problems.add(path, p.message);
      }
    }
  }

  // ---- time and output settings that do not need the mesh
  const scheme = sc.time.scheme ?? 'imex';
  if (sc.time.solver && scheme === 'explicit') problems.add(['time', 'solver'], 'the explicit scheme solves no linear systems; remove "solver" or use scheme: imex');
  const colour = sc.output?.colour ?? model?.display ?? species[0];
  if (colour !== undefined && species.length && !species.includes(colour)) problems.add(['output', 'colour'], `"${colour}" is not a species (${species.join(', ')})`);
  const colormap = (sc.output?.colormap ?? 'viridis') as ColormapName;
  if (!COLORMAP_NAMES.includes(colormap)) problems.add(['output', 'colormap'], `unknown colormap "${colormap}"; choose one of ${COLORMAP_NAMES.join(', ')}`);
  const range = sc.output?.range ?? 'frame';
  if (Array.isArray(range) && !(range[1] > range[0])) problems.add(['output', 'range'], `[min, max] needs max > min, got [${range.join(', ')}]`);
  const measured = sc.analysis?.species ?? colour;
  if (sc.analysis?.species !== undefined && species.length && !species.includes(sc.analysis.species)) problems.add(['analysis', 'species'], `"${sc.analysis.species}" is not a species (${species.join(', ')})`);
  if (sc.diffusion) {
    for (const name of Object.keys(sc.diffusion)) {
      if (species.length && !species.includes(name)) problems.add(['diffusion', name], `"${name}" is not a species (${species.join(', ')})`);
    }
  }
  problems.fail(file);

  // ---- mesh
  let loaded: LoadedMesh;
  const meshSpec = sc.mesh;
  if ((meshSpec.shape === undefined) === (meshSpec.file === undefined)) {
    problems.add(['mesh'], meshSpec.shape ? 'give either a shape or a file, not both' : 'give a built-in shape (shape: sphere) or a mesh file (file: paddle.ply)');
    problems.fail(file);
  }
  try {
    loaded = env.loadMesh(meshSpec);
  } catch (e) {
    problems.add(['mesh', meshSpec.file !== undefined ? 'file' : 'shape'], (e as Error).message);
    problems.fail(file);
    throw e;
  }
  const mesh = loaded.mesh;
  const n = mesh.positions.length / 3;
  const requested = sc.time.solver ?? 'auto';
  const nS = species.length;
  const kin = kinetics!;

  /** a per-vertex value of the mesh file, or a problem naming the ones it has */
  const vertexDataOf = (name: string, path: (string | number)[]): Float64Array | undefined => {
    const data = loaded.vertexData[name];
    if (!data) {
      const names = Object.keys(loaded.vertexData);
      problems.add(path, `the mesh has no per-vertex value "${name}"; ${names.length ? `it has ${names.join(', ')}` : 'it carries no per-vertex values (PLY files can, as extra vertex properties)'}`);
    }
    return data;
  };
  // ---- parameters: constants first (field formulas may use them), then fields
  const fieldValue = (value: FieldValue, path: (string | number)[], constants: Record<string, number>): number | Float64Array | undefined => {
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
  for (const [name, v] of Object.entries(parameterSpec)) if (typeof v === 'number') constants[name] = v;
  const paramValues: (number | Float64Array)[] = [];
  for (const [name, v] of Object.entries(parameterSpec)) {
    const path = ['kinetics', 'parameters', name];
    const r = typeof v === 'number' ? v : fieldValue(v, path, constants);
    if (r === undefined) { paramValues.push(0); continue; }
    if (typeof r === 'number') constants[name] = r;
    paramValues.push(r);
  }

  // ---- diffusion: the model's defaults (which may name parameters), overridden per species
  const diffusionSpec: Record<string, FieldValue> = {};
  const diffusion: (number | Float64Array)[] = [];
  for (const s of species) {
    const v = sc.diffusion?.[s] ?? model?.diffusion[s];
    const path = sc.diffusion?.[s] !== undefined ? ['diffusion', s] : ['kinetics'];
    if (v === undefined) {
      problems.add(['diffusion'], `no diffusion coefficient for species "${s}" (write ${s}: 0 for one that does not move)`);
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
  problems.fail(file);

  const system: ReactionDiffusionSystem = { mesh, kinetics: kin, parameters: paramValues, diffusion };
  const seed = sc.seed ?? DEFAULT_SEED;

  // ---- initial state
  const initial = new Float64Array(n * nS);
  const init = sc.initial ?? {};
  const steadyIndex = init.steadyState ?? 0;
  const anyFieldParam = paramValues.some((p) => typeof p !== 'number');
  const steadyAt = (i: number): number[] | undefined => {
    if (!model?.steadyStates) return undefined;
    const p: Record<string, number> = {};
    Object.keys(parameterSpec).forEach((name, j) => {
      const v = paramValues[j];
      p[name] = typeof v === 'number' ? v : v[i];
    });
    return model.steadyStates(p)[steadyIndex];
  };
  const valuesSpec = init.values ?? 'steady';
  const wantsSteady = valuesSpec === 'steady' || Object.values(valuesSpec).includes('steady');
  let uniformSteady: number[] | undefined;
  if (wantsSteady) {
    if (!model?.steadyStates) {
      problems.add(['initial', 'values'], `your own kinetics has no closed-form steady state here: give a starting value per species (values: {${species.map((s) => `${s}: 1`).join(', ')}})`);
    } else {
      uniformSteady = steadyAt(0);
      const count = model.steadyStates(constants).length;
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
  } else if (problems.list.length === 0) {
    for (let s = 0; s < nS; s++) {
      const v = valuesSpec === 'steady' ? 'steady' : valuesSpec[species[s]] ?? (wantsSteady ? 'steady' : undefined);
      const path = ['initial', 'values', species[s]];
      if (v === undefined) {
        problems.add(['initial', 'values'], `no starting value for species "${species[s]}"`);
      } else if (v === 'steady') {
        for (let i = 0; i < n; i++) initial[i * nS + s] = anyFieldParam ? (steadyAt(i)?.[s] ?? NaN) : uniformSteady![s];
      } else {
        const f = fieldValue(v, path, constants);
        if (f !== undefined) for (let i = 0; i < n; i++) initial[i * nS + s] = typeof f === 'number' ? f : f[i];
      }
    }
    if (valuesSpec !== 'steady') {
      for (const name of Object.keys(valuesSpec)) if (!species.includes(name)) problems.add(['initial', 'values', name], `"${name}" is not a species (${species.join(', ')})`);
    }
  }
  const rand = seededRandom(seed);
  if (init.spots) {
    const sp = init.spots;
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
  if (init.noise !== undefined) {
    const amp = typeof init.noise === 'number' ? init.noise : init.noise.amplitude;
    const which = typeof init.noise === 'number' || !init.noise.species ? species : init.noise.species;
    for (const name of which) if (!species.includes(name)) problems.add(['initial', 'noise', 'species'], `"${name}" is not a species (${species.join(', ')})`);
    const idx = which.map((name) => species.indexOf(name)).filter((s) => s >= 0);
    for (let i = 0; i < n; i++) for (const s of idx) initial[i * nS + s] += amp * (2 * rand() - 1);
  }
  problems.fail(file);
  for (let i = 0; i < initial.length; i++) {
    if (!Number.isFinite(initial[i])) {
      problems.add(['initial'], `the starting value of ${species[i % nS]} at vertex ${Math.floor(i / nS)} is ${initial[i]}; check the formulas and parameters`);
      problems.fail(file);
    }
  }

  // ---- time step
  const stiffness = cotanStiffness(mesh);
  const mass = lumpedMass(mesh);
  const end = sc.time.end;
  let dt = sc.time.step;
  let explicitLimit: ExplicitStepLimit | undefined;
  /** a default step no larger than `largest` that fits a whole number of times into the output interval (or the end time) */
  const wholeSteps = (largest: number) => {
    const base = sc.output?.every ?? end / 20;
    return base / Math.ceil(base / largest - 1e-9);
  };
  if (scheme === 'explicit') {
    explicitLimit = systemExplicitLimit(system, stiffness, mass);
    if (dt === undefined) {
      dt = wholeSteps(Math.min(0.9 * explicitLimit.safeUpTo, model?.suggestedStep ?? Infinity, end / 10));
    } else if (dt > explicitLimit.unstableAbove) {
      problems.add(['time', 'step'], `${dt} is above the explicit scheme's stability limit ${explicitLimit.unstableAbove.toPrecision(3)} on this mesh (2/(D·λmax)); use step ≤ ${explicitLimit.safeUpTo.toPrecision(3)}, or scheme: imex`);
    } else if (dt > explicitLimit.safeUpTo) {
      warnings.push(`time.step ${dt} exceeds the explicit scheme's positivity bound ${explicitLimit.safeUpTo.toPrecision(3)} on this mesh: values may oscillate or turn negative; ${explicitLimit.unstableAbove.toPrecision(3)} is certainly unstable`);
    }
  } else if (dt === undefined) {
    if (model?.suggestedStep === undefined) problems.add(['time'], 'missing "step": for your own kinetics give a time step (the implicit–explicit scheme is stable for any step in diffusion, but the reactions set the accuracy)');
    else dt = wholeSteps(Math.min(model.suggestedStep, end / 10));
  }
  problems.fail(file);
  const step = dt!;
  let solver: 'cg' | 'cholesky' = requested === 'auto' ? 'cg' : requested;
  let solverReason = requested === 'auto' ? (sc.growth ? 'auto: a growing surface changes M + dt·D·K at every geometry update, CG follows it at no cost' : 'auto') : 'requested';
  if (scheme === 'imex' && requested === 'auto' && !sc.growth && n <= AUTO_CHOLESKY_VERTICES) {
    const stiffnessRatio = step * systemExplicitLimit(system, stiffness, mass).largestRate;
    if (stiffnessRatio > AUTO_CHOLESKY_STIFFNESS) {
      solver = 'cholesky';
      solverReason = `auto: dt·D·λmax = ${stiffnessRatio.toPrecision(3)} > ${AUTO_CHOLESKY_STIFFNESS} would slow CG`;
    } else solverReason = `auto: dt·D·λmax = ${stiffnessRatio.toPrecision(3)}, CG converges in few iterations`;
  }
  const steps = Math.max(1, Math.ceil(end / step - 1e-9));
  if (Math.abs(steps * step - end) > 1e-9 * end) warnings.push(`time.end ${end} is not a whole number of steps of ${step}; the run ends at ${steps * step}`);
  // parameter values for the linear analyses below (fields as 0 unless a constant shadows them),
  // and the steady state they are taken at: the chosen closed-form one, else Newton's, computed once
  const constantParams = Object.keys(parameterSpec).map((name, j) => (typeof paramValues[j] === 'number' ? (paramValues[j] as number) : constants[name] ?? 0));
  let linearStateMemo: number[] | undefined | null = null;
  const linearState = (): number[] | undefined => {
    if (linearStateMemo === null) linearStateMemo = uniformSteady ?? numericalSteadyStates(kin, constantParams, seed)[steadyIndex];
    return linearStateMemo;
  };
  // the reactions are stepped explicitly in both schemes: forward Euler is stable at the steady
  // state only if |1 + dt·λ| ≤ 1 for every eigenvalue λ of its Jacobian
  if (uniformSteady || !model?.steadyStates) {
    const state = linearState();
    if (state) {
      const eigen = smallMatrixEigenvalues(Array.from(kin.jacobian(state, constantParams)), nS);
      let limit = Infinity, worst = 0;
      for (const [re, im] of eigen) {
        worst = Math.max(worst, Math.hypot(1 + step * re, step * im));
        if (re < 0) limit = Math.min(limit, (-2 * re) / (re * re + im * im));
      }
      if (worst > 1 + 1e-12) {
        warnings.push(`time.step ${step} makes the explicit reaction update unstable at the steady state (|1 + dt·λ| = ${worst.toPrecision(4)} > 1): homogeneous oscillations will grow${Number.isFinite(limit) ? `; use time.step < ${limit.toPrecision(3)}` : ''}`);
      }
    }
  }
  const every = sc.output?.every ?? end / 20;
  const everySteps = Math.max(1, Math.round(every / step));
  if (Math.abs(everySteps * step - every) > 1e-9 * every) warnings.push(`output.every ${every} is not a whole number of steps of ${step}; frames come every ${everySteps} steps (${everySteps * step})`);
  const output: OutputPlan = { formats: (sc.output?.formats ?? []).filter((f): f is 'glb' | 'obj' | 'csv' => f !== 'ply'), every: everySteps * step, everySteps, colour: colour!, colormap, range, frames: sc.output?.frames ?? true };
  const analysis: AnalysisPlan = {
    species: measured!,
    threshold: sc.analysis?.threshold ?? 'mid-range',
    modes: Math.min(sc.analysis?.modes ?? (n <= AUTO_SPECTRUM_VERTICES ? AUTO_SPECTRUM_MODES : 0), n - 1),
  };

  // ---- growth
  let growth: GrowthPlan | undefined;
  if (sc.growth) {
    const g = sc.growth;
    const course = g.course ?? 'exponential';
    let centre = g.centre;
    if (!centre) {
      const m = lumpedMass(mesh);
      let a = 0, cx = 0, cy = 0, cz = 0;
      for (let i = 0; i < n; i++) { a += m[i]; cx += m[i] * mesh.positions[3 * i]; cy += m[i] * mesh.positions[3 * i + 1]; cz += m[i] * mesh.positions[3 * i + 2]; }
      centre = [cx / a, cy / a, cz / a];
    }
    const c = centre;
    const only = (keys: (keyof typeof g)[], law: string) => {
      for (const k of ['rate', 'rates', 'axes', 'speed', 'expansion'] as const) if (g[k] !== undefined && !keys.includes(k)) problems.add(['growth', k], `"${k}" does not apply to law: ${law}`);
    };
    if (g.capacity !== undefined && course !== 'logistic') problems.add(['growth', 'capacity'], 'capacity applies to course: logistic');
    let makeLaw: GrowthPlan['makeLaw'] | undefined;
    if (g.refine && g.refine.edgeGrowth === undefined && g.refine.perWavelength === undefined) problems.add(['growth', 'refine'], 'say when to refine: edgeGrowth (a factor since the start) and/or perWavelength (edges per fastest-growing wavelength)');
    /** the longest mean edge that keeps `perWavelength` edges per fastest-growing wavelength 2π/√k² */
    const refineEdgeFor = (perWavelength: number | undefined): number => {
      if (perWavelength === undefined) return Infinity;
      const d = diffusion.map((x) => (typeof x === 'number' ? x : x.reduce((a, b) => a + b, 0) / x.length));
      const state = linearState();
      const fastest = state ? turingAnalysis(Array.from(kin.jacobian(state, constantParams)), d).fastest : null;
      if (!fastest) {
        problems.add(['growth', 'refine', 'perWavelength'], 'the kinetics has no unstable band here, so no pattern wavelength to refine for; use edgeGrowth');
        return Infinity;
      }
      return (2 * Math.PI) / Math.sqrt(fastest.k2) / perWavelength;
    };
    for (const k of ['keyframes', 'interpolation', 'align', 'maxFolded'] as const) {
      if (g[k] !== undefined && g.law !== 'keyframes') problems.add(['growth', k], `"${k}" applies to law: keyframes`);
    }
    if (g.law === 'keyframes') {
      only([], 'keyframes');
      if (g.course !== undefined || g.centre !== undefined || g.capacity !== undefined) problems.add(['growth'], 'course, centre and capacity apply to scaling laws, not to keyframes');
      if (!g.keyframes) problems.add(['growth'], 'missing "keyframes": a list of {time, file} stages after the start');
      else {
        const times = [0];
        const stages: Float64Array[] = [Float64Array.from(mesh.positions)];
        g.keyframes.forEach((kf, j) => {
          const path = ['growth', 'keyframes', j];
          if (kf.time <= times[times.length - 1]) problems.add([...path, 'time'], `keyframe times must increase: ${kf.time} follows ${times[times.length - 1]}`);
          let stage: LoadedMesh;
          try {
            stage = env.loadMesh({ file: kf.file });
          } catch (e) {
            problems.add([...path, 'file'], (e as Error).message);
            return;
          }
          const same = stage.mesh.triangles.length === mesh.triangles.length && stage.mesh.positions.length === mesh.positions.length && stage.mesh.triangles.every((v, i) => v === mesh.triangles[i]);
          if (same) {
            stages.push(Float64Array.from(stage.mesh.positions));
          } else {
            const map = mapOntoSurface(mesh, stage.mesh, g.align ?? 'none');
            const bad = map.folded.length + map.collapsed.length;
            const nF = mesh.triangles.length / 3;
            if (bad > (g.maxFolded ?? 0) * nF) {
              const t = map.folded[0] ?? map.collapsed[0];
              const tri = mesh.triangles;
              const where = [0, 1, 2].map((d) => ((map.positions[3 * tri[3 * t] + d] + map.positions[3 * tri[3 * t + 1] + d] + map.positions[3 * tri[3 * t + 2] + d]) / 3).toPrecision(3));
              problems.add([...path, 'file'], `carrying the mesh onto this stage by closest points folds ${map.folded.length} and collapses ${map.collapsed.length} of ${nF} triangles (first: triangle ${t} near (${where.join(', ')})); align it (align: similarity), use a closer stage, or allow some with maxFolded`);
              return;
            }
            if (bad) warnings.push(`keyframe ${j} (${kf.file}): the closest-point map folds ${map.folded.length} and collapses ${map.collapsed.length} triangles (tolerated by maxFolded)`);
            stages.push(map.positions);
          }
          times.push(kf.time);
        });
        const interpolation = g.interpolation ?? 'cubic';
        makeLaw = (_reference, refinements) => {
          const refined = stages.map((x) => refinements.reduce((acc, rf) => prolongField(acc, rf, 3), x));
          return keyframeGrowth(times, refined, interpolation, `${g.keyframes!.length + 1} keyframes at t = ${times.join(', ')}, ${interpolation} interpolation`);
        };
      }
    } else if (g.law === 'uniform') {
      only(['rate'], 'uniform');
      if (g.rate === undefined) problems.add(['growth'], 'missing "rate": the relative growth rate of lengths per unit time');
      else makeLaw = (ref) => affineGrowth(ref, [g.rate!, g.rate!, g.rate!], course, c, g.capacity);
    } else if (g.law === 'anisotropic') {
      only(['rates', 'axes'], 'anisotropic');
      let axes: [number, number, number][] | undefined;
      if (g.axes) {
        axes = g.axes.map((a) => { const l = Math.hypot(...a); return a.map((x) => x / l) as [number, number, number]; });
        const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
        if (axes.some((a) => !a.every(Number.isFinite)) || Math.abs(dot(axes[0], axes[1])) > 1e-6 || Math.abs(dot(axes[0], axes[2])) > 1e-6 || Math.abs(dot(axes[1], axes[2])) > 1e-6) {
          problems.add(['growth', 'axes'], 'the three axes must be non-zero and mutually perpendicular');
          axes = undefined;
        }
      }
      if (!g.rates) problems.add(['growth'], 'missing "rates": [x, y, z] growth rates');
      else makeLaw = (ref) => affineGrowth(ref, g.rates!, course, c, g.capacity, axes);
    } else {
      only(['speed', 'expansion'], 'normal');
      if (g.course !== undefined) problems.add(['growth', 'course'], 'course applies to uniform and anisotropic growth');
      if (!g.speed && !g.expansion) problems.add(['growth'], 'missing "speed" (along the normal) or "expansion" (local areal rate): a formula in x, y, z, t or {vertexData: NAME}');
      /** a per-vertex field of the growth section, carried through refinements */
      const vertexField = (key: 'speed' | 'expansion'): ((refinements: readonly Refinement[]) => VertexSpeed) | undefined => {
        const spec = g[key];
        if (spec === undefined) return undefined;
        if (typeof spec === 'string') {
          try {
            const f = compileSpaceTimeFormula(spec, constants);
            return () => (_i, x, y, z, t) => f(x, y, z, t);
          } catch (e) {
            if (!(e instanceof FormulaError)) throw e;
            problems.add(['growth', key], e.message);
            return undefined;
          }
        }
        const values = vertexDataOf(spec.vertexData, ['growth', key]);
        if (!values) return undefined;
        return (refinements) => {
          const v = refinements.reduce<Float64Array>((acc, rf) => prolongField(acc, rf), Float64Array.from(values));
          return (i) => v[i];
        };
      };
      const speed = vertexField('speed'), expansion = vertexField('expansion');
      const text = (spec: string | { vertexData: string }) => (typeof spec === 'string' ? spec : `the per-vertex values "${spec.vertexData}"`);
      const description = [g.speed !== undefined ? `growth along the normal at speed ${text(g.speed)}` : '', g.expansion !== undefined ? `tangential expansion at areal rate ${text(g.expansion)}` : ''].filter(Boolean).join(', with ');
      if ((g.speed === undefined || speed) && (g.expansion === undefined || expansion) && (speed || expansion)) {
        makeLaw = (_reference, refinements) => normalGrowth(speed?.(refinements), description, expansion?.(refinements));
      }
    }
    if (makeLaw) {
      growth = {
        makeLaw,
        centre: g.law === 'uniform' || g.law === 'anisotropic' ? c : undefined,
        description: makeLaw(mesh.positions, []).description,
        tolerance: g.tolerance ?? 1e-3,
        refine: g.refine ? { edgeGrowth: g.refine.edgeGrowth ?? Infinity, maxEdge: refineEdgeFor(g.refine.perWavelength), maxVertices: g.refine.maxVertices ?? 400_000 } : undefined,
      };
    }
    problems.fail(file);
  }

  const summary = {
    name: sc.name ?? file.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, ''),
    seed,
    mesh: loaded.source,
    kinetics: { model: model?.name ?? 'custom', citation: model?.citation, species, reactions, parameters: parameterSpec },
    diffusion: diffusionSpec,
    initial: init,
    time: { scheme, step, end, steps, steadyState: sc.time.steadyState, solver: scheme === 'imex' ? solver : undefined, solverChoice: scheme === 'imex' ? solverReason : undefined, tolerance: scheme === 'imex' ? sc.time.tolerance ?? 1e-8 : undefined },
    output,
    analysis,
    growth: growth ? { ...sc.growth, centre: growth.centre, description: growth.description, tolerance: growth.tolerance } : undefined,
    explicitLimit,
  };
  return {
    name: summary.name,
    seed,
    mesh,
    meshSource: loaded.source,
    meshNotes: loaded.notes,
    model: model?.name ?? 'custom',
    kineticsModel: model,
    species,
    reactions,
    parameters: parameterSpec,
    diffusion: diffusionSpec,
    kinetics: kin,
    system,
    initial,
    scheme,
    dt: step,
    end,
    steps,
    steadyState: sc.time.steadyState,
    solver,
    tolerance: sc.time.tolerance ?? 1e-8,
    explicitLimit,
    output,
    analysis,
    growth,
    warnings,
    summary,
  };
}

