import type { Mesh } from '../mesh/Mesh.ts';
import type { GrowthSpec } from './Scenario.ts';
import type { Problems } from './Problems.ts';
import type { GrowthPlan, LoadedMesh, ScenarioEnvironment } from './ResolvedScenario.ts';
import { affineGrowth } from '../growth/affineGrowth.ts';
import { normalGrowth, type VertexSpeed } from '../growth/normalGrowth.ts';
import { keyframeGrowth } from '../growth/keyframeGrowth.ts';
import { locateOnSurface, mapOntoSurface, REGISTRATION_STIFFNESS_LENGTHS } from '../growth/mapOntoSurface.ts';
import { stageMapReport, type StageMapReport } from '../growth/stageMapReport.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { compileSpaceTimeFormula } from '../kinetics/surfaceField.ts';
import { FormulaError } from '../kinetics/FormulaError.ts';
import { prolongField, type Refinement } from '../mesh/Refinement.ts';

/** What a growth law's builder may use: the section, the start mesh, and the scenario's files and values. */
export interface GrowthLawInput {
  g: GrowthSpec;
  problems: Problems;
  mesh: Mesh;
  /** the scaling centre (given, or the area centroid) */
  centre: [number, number, number];
  /** constant kinetics parameters (formulas of speeds may use them) */
  constants: Record<string, number>;
  vertexDataOf(name: string, path: (string | number)[]): Float64Array | undefined;
  env: ScenarioEnvironment;
  warnings: string[];
  /** where a keyframe law puts the report of each stage it maps */
  stageMaps?: StageMapReport[];
}

export interface GrowthLawEntry {
  /** the keys of the growth section this law reads, beyond law, tolerance and refine */
  keys: readonly (keyof GrowthSpec)[];
  /** law-specific checks of keys it does not take, with the message to give (the generic ones are in resolveGrowth) */
  refuses?: { keys: readonly (keyof GrowthSpec)[]; path: string[]; message: string }[];
  /** the law on a reference surface, or undefined after recording problems */
  build(input: GrowthLawInput): GrowthPlan['makeLaw'] | undefined;
}

/** Per-vertex speeds of the normal law: a formula in x, y, z, t, or per-vertex values carried through refinements. */
function vertexField(input: GrowthLawInput, key: 'speed' | 'expansion'): ((refinements: readonly Refinement[]) => VertexSpeed) | undefined {
  const spec = input.g[key];
  if (spec === undefined) return undefined;
  if (typeof spec === 'string') {
    try {
      const f = compileSpaceTimeFormula(spec, input.constants);
      return () => (_i, x, y, z, t) => f(x, y, z, t);
    } catch (e) {
      if (!(e instanceof FormulaError)) throw e;
      input.problems.add(['growth', key], e.message);
      return undefined;
    }
  }
  const values = input.vertexDataOf(spec.vertexData, ['growth', key]);
  if (!values) return undefined;
  return (refinements) => {
    const v = refinements.reduce<Float64Array>((acc, rf) => prolongField(acc, rf), Float64Array.from(values));
    return (i) => v[i];
  };
}

/**
 * Keyframe stages: same connectivity taken as they are; others reached in a
 * chain (start → stage 1 → stage 2 …), each by an affine alignment and a
 * smooth registration onto the next stage (mapOntoSurface), landmarks pinning
 * what the shapes leave open. A map that still folds is refused, naming where.
 */
function keyframeStages(input: GrowthLawInput): GrowthPlan['makeLaw'] | undefined {
  const { g, problems, mesh } = input;
  if (!g.keyframes) {
    problems.add(['growth'], 'missing "keyframes": a list of {time, file} stages after the start');
    return undefined;
  }
  const times = [0];
  const stages: Float64Array[] = [Float64Array.from(mesh.positions)];
  const alignment = g.align ?? 'affine';
  // landmarks: named points on the start surface, carried through the chain by their triangle and weights
  const start = g.landmarks ?? {};
  const located = new Map<string, { corners: [number, number, number]; weights: [number, number, number] }>();
  const places = locateOnSurface(mesh, Object.values(start));
  Object.entries(start).forEach(([name, point], k) => {
    located.set(name, places[k]);
    if (places[k].distance > 0.05 * Math.sqrt(meshArea(mesh))) input.warnings.push(`growth.landmarks.${name}: (${point.join(', ')}) lies ${places[k].distance.toPrecision(3)} from the start surface; it is pinned at the surface's closest point`);
  });
  const reports: StageMapReport[] = [];
  let current = stages[0];
  let failed = false;
  g.keyframes.forEach((kf, j) => {
    if (failed) return;
    const path = ['growth', 'keyframes', j];
    if (kf.time <= times[times.length - 1]) problems.add([...path, 'time'], `keyframe times must increase: ${kf.time} follows ${times[times.length - 1]}`);
    for (const name of Object.keys(kf.landmarks ?? {})) if (!located.has(name)) problems.add([...path, 'landmarks', name], `no landmark "${name}" on the start mesh: give its point there under growth.landmarks (${located.size ? `known: ${[...located.keys()].join(', ')}` : 'none given'})`);
    let stage: LoadedMesh;
    try {
      stage = input.env.loadMesh({ file: kf.file });
    } catch (e) {
      problems.add([...path, 'file'], (e as Error).message);
      failed = true;
      return;
    }
    const same = stage.mesh.triangles.length === mesh.triangles.length && stage.mesh.positions.length === mesh.positions.length && stage.mesh.triangles.every((v, i) => v === mesh.triangles[i]);
    if (same) {
      current = Float64Array.from(stage.mesh.positions);
    } else {
      const names = Object.keys(kf.landmarks ?? {}).filter((name) => located.has(name));
      const landmarks = names.map((name) => ({ ...located.get(name)!, target: kf.landmarks![name] }));
      input.env.progress?.(`carrying the mesh onto stage ${j + 1} (${kf.file}, ${stage.mesh.positions.length / 3} vertices)…`);
      const t0 = performance.now();
      const map = mapOntoSurface({ positions: current, triangles: mesh.triangles }, stage.mesh, { alignment, landmarks });
      const report = stageMapReport(mesh.triangles, current, map, stage.mesh, { stage: j + 1, file: kf.file, time: kf.time, landmarkNames: names, seconds: (performance.now() - t0) / 1000 });
      reports.push(report);
      const bad = map.folded.length + map.collapsed.length + map.bridging.length;
      const nF = mesh.triangles.length / 3;
      if (bad > (g.maxFolded ?? 0) * nF) {
        const t = map.folded[0] ?? map.collapsed[0] ?? map.bridging[0];
        const tri = mesh.triangles;
        const where = [0, 1, 2].map((d) => ((map.positions[3 * tri[3 * t] + d] + map.positions[3 * tri[3 * t + 1] + d] + map.positions[3 * tri[3 * t + 2] + d]) / 3).toPrecision(3));
        const tried = `${alignment === 'none' ? 'no global alignment' : `${alignment} alignment`}, a smooth registration with its stiffness lowered in ${REGISTRATION_STIFFNESS_LENGTHS.length} steps, then closest points${map.relaxed ? ` and relaxation of ${map.relaxed} vertices` : ''}`;
        const give = [
          names.length === 0 ? 'landmarks (growth.landmarks and each stage\'s landmarks: the base centre, the distal tip…) to pin what the shapes leave open' : 'more landmarks near the fold',
          `an intermediate stage between t = ${times[times.length - 1]} and ${kf.time}`,
          alignment !== 'affine' ? 'align: affine (stretch along axes taken out first)' : '',
        ].filter(Boolean);
        problems.add([...path, 'file'], `carrying the mesh onto this stage folds ${map.folded.length}, collapses ${map.collapsed.length} and stretches ${map.bridging.length} across gaps of ${nF} triangles (first: triangle ${t} near (${where.join(', ')})) after ${tried}; give ${give.join(', or ')}${g.maxFolded === undefined ? '; or tolerate a fraction with maxFolded' : ''}`);
        failed = true;
        return;
      }
      if (bad) input.warnings.push(`keyframe ${j} (${kf.file}): the map folds ${map.folded.length}, collapses ${map.collapsed.length} and stretches ${map.bridging.length} triangles across gaps (tolerated by maxFolded)`);
      current = map.positions;
    }
    stages.push(current);
    times.push(kf.time);
  });
  if (failed) return undefined;
  const interpolation = g.interpolation ?? 'cubic';
  const makeLaw: GrowthPlan['makeLaw'] = (_reference, refinements) => {
    const refined = stages.map((x) => refinements.reduce((acc, rf) => prolongField(acc, rf, 3), x));
    return keyframeGrowth(times, refined, interpolation, `${g.keyframes!.length + 1} keyframes at t = ${times.join(', ')}, ${interpolation} interpolation`);
  };
  input.stageMaps?.push(...reports);
  return makeLaw;
}

/**
 * The growth laws a scenario can name (`growth.law`), with the keys each reads.
 * A new law: write it in solver/growth/, add its keys to the growth schema in
 * Scenario.ts and an entry here.
 */
export const GROWTH_LAWS: Record<GrowthSpec['law'], GrowthLawEntry> = {
  uniform: {
    keys: ['rate', 'course', 'capacity', 'centre'],
    build({ g, problems, centre }) {
      if (g.rate === undefined) {
        problems.add(['growth'], 'missing "rate": the relative growth rate of lengths per unit time');
        return undefined;
      }
      return (ref) => affineGrowth(ref, [g.rate!, g.rate!, g.rate!], g.course ?? 'exponential', centre, g.capacity);
    },
  },
  anisotropic: {
    keys: ['rates', 'axes', 'course', 'capacity', 'centre'],
    build({ g, problems, centre }) {
      let axes: [number, number, number][] | undefined;
      if (g.axes) {
        axes = g.axes.map((a) => { const l = Math.hypot(...a); return a.map((x) => x / l) as [number, number, number]; });
        const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
        if (axes.some((a) => !a.every(Number.isFinite)) || Math.abs(dot(axes[0], axes[1])) > 1e-6 || Math.abs(dot(axes[0], axes[2])) > 1e-6 || Math.abs(dot(axes[1], axes[2])) > 1e-6) {
          problems.add(['growth', 'axes'], 'the three axes must be non-zero and mutually perpendicular');
          axes = undefined;
        }
      }
      if (!g.rates) {
        problems.add(['growth'], 'missing "rates": [x, y, z] growth rates');
        return undefined;
      }
      return (ref) => affineGrowth(ref, g.rates!, g.course ?? 'exponential', centre, g.capacity, axes);
    },
  },
  normal: {
    keys: ['speed', 'expansion'],
    refuses: [{ keys: ['course'], path: ['growth', 'course'], message: 'course applies to uniform and anisotropic growth' }],
    build(input) {
      const { g, problems } = input;
      if (!g.speed && !g.expansion) problems.add(['growth'], 'missing "speed" (along the normal) or "expansion" (local areal rate): a formula in x, y, z, t or {vertexData: NAME}');
      const speed = vertexField(input, 'speed'), expansion = vertexField(input, 'expansion');
      const text = (spec: string | { vertexData: string }) => (typeof spec === 'string' ? spec : `the per-vertex values "${spec.vertexData}"`);
      const description = [g.speed !== undefined ? `growth along the normal at speed ${text(g.speed)}` : '', g.expansion !== undefined ? `tangential expansion at areal rate ${text(g.expansion)}` : ''].filter(Boolean).join(', with ');
      if (!((g.speed === undefined || speed) && (g.expansion === undefined || expansion) && (speed || expansion))) return undefined;
      return (_reference, refinements) => normalGrowth(speed?.(refinements), description, expansion?.(refinements));
    },
  },
  keyframes: {
    keys: ['keyframes', 'interpolation', 'align', 'maxFolded', 'landmarks'],
    refuses: [{ keys: ['course', 'centre', 'capacity'], path: ['growth'], message: 'course, centre and capacity apply to scaling laws, not to keyframes' }],
    build: keyframeStages,
  },
};
