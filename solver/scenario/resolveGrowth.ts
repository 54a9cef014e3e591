import type { Mesh } from '../mesh/Mesh.ts';
import type { GrowthSpec } from './Scenario.ts';
import type { ResolveContext } from './Problems.ts';
import type { GrowthPlan, ScenarioEnvironment } from './ResolvedScenario.ts';
import type { FieldPlan } from './resolveFields.ts';
import type { Linearisation } from './linearisation.ts';
import { GROWTH_LAWS } from './growthLaws.ts';
import type { StageMapReport } from '../growth/stageMapReport.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { weightedCentroid } from '../mesh/weightedCentroid.ts';
import { GROWTH_AREA_TOLERANCE, GROWTH_REFINE_MAX_VERTICES } from '../defaults.ts';

/** Keys that belong to one law or another: named when given to a law that does not read them. */
const LAW_KEYS = ['rate', 'rates', 'axes', 'speed', 'expansion'] as const;
const KEYFRAME_KEYS = ['keyframes', 'interpolation', 'align', 'maxFolded', 'landmarks'] as const;

/**
 * The `growth` section: the law (from GROWTH_LAWS) with the keys it reads
 * checked, the geometry tolerance, and when to refine — after a factor of
 * edge growth, or when edges exceed the fastest-growing wavelength over
 * `perWavelength`.
 */
export function resolveGrowth(ctx: ResolveContext, g: GrowthSpec, mesh: Mesh, fields: FieldPlan, lin: Linearisation, env: ScenarioEnvironment): GrowthPlan | undefined {
  const { problems } = ctx;
  const entry = GROWTH_LAWS[g.law];
  const course = g.course ?? 'exponential';
  const centre = g.centre ?? weightedCentroid(mesh.positions, lumpedMass(mesh)); // the area centroid
  for (const k of LAW_KEYS) if (g[k] !== undefined && !entry.keys.includes(k)) problems.add(['growth', k], `"${k}" does not apply to law: ${g.law}`);
  if (g.capacity !== undefined && course !== 'logistic') problems.add(['growth', 'capacity'], 'capacity applies to course: logistic');
  if (g.refine && g.refine.edgeGrowth === undefined && g.refine.perWavelength === undefined) problems.add(['growth', 'refine'], 'say when to refine: edgeGrowth (a factor since the start) and/or perWavelength (edges per fastest-growing wavelength)');
  /** the longest mean edge that keeps `perWavelength` edges per fastest-growing wavelength 2π/√k² */
  const refineEdgeFor = (perWavelength: number | undefined): number => {
    if (perWavelength === undefined) return Infinity;
    const fastest = lin.fastest(fields.diffusion);
    if (!fastest) {
      problems.add(['growth', 'refine', 'perWavelength'], 'the kinetics has no unstable band here, so no pattern wavelength to refine for; use edgeGrowth');
      return Infinity;
    }
    return (2 * Math.PI) / Math.sqrt(fastest.k2) / perWavelength;
  };
  for (const k of KEYFRAME_KEYS) if (g[k] !== undefined && g.law !== 'keyframes') problems.add(['growth', k], `"${k}" applies to law: keyframes`);
  for (const r of entry.refuses ?? []) if (r.keys.some((k) => g[k] !== undefined)) problems.add(r.path, r.message);
  const stageMaps: StageMapReport[] = [];
  const makeLaw = entry.build({ g, problems, mesh, centre, constants: fields.constants, vertexDataOf: fields.vertexDataOf, env, warnings: ctx.warnings, stageMaps });
  let plan: GrowthPlan | undefined;
  if (makeLaw) {
    plan = {
      makeLaw,
      centre: entry.keys.includes('centre') ? centre : undefined,
      description: makeLaw(mesh.positions, []).description,
      tolerance: g.tolerance ?? GROWTH_AREA_TOLERANCE,
      stages: stageMaps.length ? stageMaps : undefined,
      refine: g.refine ? { edgeGrowth: g.refine.edgeGrowth ?? Infinity, maxEdge: refineEdgeFor(g.refine.perWavelength), maxVertices: g.refine.maxVertices ?? GROWTH_REFINE_MAX_VERTICES } : undefined,
    };
  }
  problems.fail(ctx.file);
  return plan;
}
