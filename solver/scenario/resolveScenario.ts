import type { ScenarioSource } from './parseScenario.ts';
import type { ScenarioProblem } from './ScenarioError.ts';
import { Problems, type ResolveContext } from './Problems.ts';
import type { LoadedMesh, ResolvedScenario, ScenarioEnvironment } from './ResolvedScenario.ts';
import { resolveKinetics } from './resolveKinetics.ts';
import { checkDiffusionNames, checkFieldFormulas, resolveFields } from './resolveFields.ts';
import { resolveInitial } from './resolveInitial.ts';
import { checkScheme, resolveTime } from './resolveTime.ts';
import { resolvePainting, resolveOutputPlan } from './resolveOutput.ts';
import { resolveGrowth } from './resolveGrowth.ts';
import { Linearisation } from './linearisation.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import { DEFAULT_SEED } from '../defaults.ts';
import { meshQuality, qualityWarnings } from '../fem/meshQuality.ts';
import { resolutionWarning } from '../analysis/meshResolution.ts';
import { scenarioTuring } from '../analysis/stabilityReport.ts';
import { edgeLengthStats } from '../mesh/edgeLengthStats.ts';
import { unitsMismatch } from '../analysis/meshResolution.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { MeshRepairError } from '../mesh/repairMesh.ts';

export type { LoadedMesh, ResolvedScenario, ScenarioEnvironment, AnalysisPlan, GrowthPlan, OutputPlan } from './ResolvedScenario.ts';

/**
 * Check a parsed scenario against the models, formulas and mesh, fill in
 * defaults and build the system, initial state and time stepping plan, one
 * section at a time (kinetics, painting, mesh, parameters and diffusion,
 * initial state, time, outputs, growth). Cheap checks come before the mesh is
 * built; each stage reports every problem it finds at once, as a
 * ScenarioError with paths and lines.
 */
export function resolveScenario(source: ScenarioSource, file: string, env: ScenarioEnvironment): ResolvedScenario {
  const sc = source.scenario;
  const ctx: ResolveContext = { source, file, problems: new Problems(source), warnings: [] };
  const { problems, warnings } = ctx;
  if (sc.sweep) warnings.push(`the sweep section is not used by a single run: the scenario runs as written; expand the sweep with placode sweep plan ${file} --out DIR`);

  // ---- what needs no mesh (cheap, and most mistakes are here)
  const { kin, painting } = resolveWithoutMesh(ctx);
  problems.fail(file);

  // ---- the mesh, and the fields on it
  const loaded = loadMesh(ctx, env);
  const mesh = loaded.mesh;
  const fields = resolveFields(ctx, kin, loaded);
  problems.fail(file);
  const kinetics = kin.kinetics!;
  const system: ReactionDiffusionSystem = { mesh, kinetics, parameters: fields.parameters, diffusion: fields.diffusion };
  const seed = sc.seed ?? DEFAULT_SEED;
  const start = resolveInitial(ctx, kin, fields, mesh, seed, env);
  const lin = new Linearisation(kinetics, kin, fields, start.uniformSteady, seed, start.steadyIndex);

  // ---- stepping, outputs, growth
  const time = resolveTime(ctx, kin, system, lin, start.uniformSteady);
  const { output, analysis } = resolveOutputPlan(ctx, painting, time, mesh.positions.length / 3);
  // a steady state that varies over the surface is the level a pattern stands out from, not a pattern itself
  const restField = start.rest?.[kin.species.indexOf(analysis.species)];
  if (restField) analysis.floor = { ...analysis.floor, rest: restField };
  const growth = sc.growth ? resolveGrowth(ctx, sc.growth, mesh, fields, lin, env) : undefined;
  // the mesh's shape quality, where it costs the run: slivers set the explicit scheme's step
  const quality = meshQuality(mesh, 5, time.operators);
  if (time.scheme === 'explicit') warnings.push(...qualityWarnings(quality));

  const name = sc.name ?? file.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '');
  const model = kin.model?.name ?? 'custom';
  const summary = {
    name,
    seed,
    mesh: loaded.source,
    kinetics: { model, citation: kin.model?.citation, species: kin.species, reactions: kin.reactions, parameters: kin.parameterSpec },
    diffusion: fields.diffusionSpec,
    initial: sc.initial ?? {},
    time: { scheme: time.scheme, step: time.dt, end: time.end, steps: time.steps, steadyState: sc.time.steadyState, solver: time.scheme === 'imex' ? time.solver : undefined, solverChoice: time.scheme === 'imex' ? time.solverReason : undefined, tolerance: time.scheme === 'imex' ? time.tolerance : undefined, threads: sc.time.threads, reactionLimit: time.reactionLimit, allowUnstable: sc.time.allowUnstable },
    output,
    analysis,
    growth: growth ? { ...sc.growth, centre: growth.centre, description: growth.description, tolerance: growth.tolerance } : undefined,
    explicitLimit: time.explicitLimit,
    fem: { laplacian: time.laplacian, ...(time.flips !== undefined ? { flips: time.flips } : {}) },
    meshQuality: { minAngle: quality.angles.min, slivers: quality.slivers, obtuseShare: quality.obtuseShare, explicitStepRatio: quality.explicitStepRatio },
  };
  const resolved: ResolvedScenario = {
    name,
    seed,
    mesh,
    meshSource: loaded.source,
    meshNotes: loaded.notes,
    units: sc.mesh.units,
    model,
    kineticsModel: kin.model,
    species: kin.species,
    reactions: kin.reactions,
    parameters: kin.parameterSpec,
    diffusion: fields.diffusionSpec,
    kinetics,
    system,
    operators: time.operators,
    laplacian: time.laplacian,
    laplacianOperators: time.laplacian === 'intrinsic-delaunay' ? time.operators : undefined,
    initial: start.initial,
    steadyStateIndex: start.steadyIndex,
    scheme: time.scheme,
    dt: time.dt,
    end: time.end,
    steps: time.steps,
    steadyState: sc.time.steadyState,
    solver: time.solver,
    tolerance: time.tolerance,
    threads: sc.time.threads,
    explicitLimit: time.explicitLimit,
    output,
    analysis,
    growth,
    warnings,
    summary,
  };
  // the mesh against the pattern's wavelength (cheap: the Turing analysis needs no eigenpairs)
  const turing = scenarioTuring(resolved);
  // (a wavelength out of all proportion to the surface is a units mistake, not a resolution to fix)
  const mismatch = turing?.fastest ? unitsMismatch(meshArea(mesh), turing.fastest.k2, sc.mesh.units) : undefined;
  const resolution = turing?.fastest && !mismatch ? resolutionWarning(edgeLengthStats(mesh).mean, turing.fastest.k2, sc.mesh.units) : undefined;
  for (const w of [mismatch, resolution]) if (w) warnings.push(w);
  return resolved;
}

/** The sections that need no mesh: kinetics (formulas compiled), scheme, painting, diffusion names. */
function resolveWithoutMesh(ctx: ResolveContext) {
  const kin = resolveKinetics(ctx);
  checkScheme(ctx);
  const painting = resolvePainting(ctx, kin);
  checkDiffusionNames(ctx, kin.species);
  checkFieldFormulas(ctx, kin);
  return { kin, painting };
}

/**
 * Every problem of a scenario that can be found without building its mesh —
 * the kinetics and its formulas, the scheme, the painting, the diffusion
 * names — at a fraction of a full resolution's cost (a sweep checks every
 * point so).
 */
export function problemsWithoutMesh(source: ScenarioSource, file: string): ScenarioProblem[] {
  const ctx: ResolveContext = { source, file, problems: new Problems(source), warnings: [] };
  resolveWithoutMesh(ctx);
  return ctx.problems.list;
}

/** The scenario's mesh from the environment: a built-in shape or a file, repaired and checked. */
function loadMesh(ctx: ResolveContext, env: ScenarioEnvironment): LoadedMesh {
  const spec = ctx.source.scenario.mesh;
  if ((spec.shape === undefined) === (spec.file === undefined)) {
    ctx.problems.add(['mesh'], spec.shape ? 'give either a shape or a file, not both' : 'give a built-in shape (shape: sphere) or a mesh file (file: paddle.ply)');
    ctx.problems.fail(ctx.file);
  }
  try {
    return env.loadMesh(spec);
  } catch (e) {
    ctx.problems.add(['mesh', e instanceof MeshRepairError ? e.option : spec.file !== undefined ? 'file' : 'shape'], (e as Error).message);
    ctx.problems.fail(ctx.file);
    throw e;
  }
}
