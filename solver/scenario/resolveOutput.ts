import type { ResolveContext } from './Problems.ts';
import type { AnalysisPlan, OutputPlan } from './ResolvedScenario.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import type { TimePlan } from './resolveTime.ts';
import { COLORMAP_NAMES, type ColormapName } from '../io/colormap.ts';
import { noiseTargets } from './resolveInitial.ts';
import { AUTO_SPECTRUM_MODES, AUTO_SPECTRUM_VERTICES, DEFAULT_COLORMAP, DEFAULT_THRESHOLD_RULE, OUTPUTS_PER_RUN, PATTERN_NOISE_FACTOR, PATTERN_RELATIVE_FLOOR } from '../defaults.ts';

/** What is painted and measured: checked before the mesh is built. */
export interface Painting {
  colour: string;
  colormap: ColormapName;
  range: [number, number] | 'frame';
  /** the species whose pattern is measured */
  measured: string;
}

/** The painted species (the model's display species by default), its colormap and range, and the measured species. */
export function resolvePainting(ctx: ResolveContext, kin: KineticsPlan): Painting {
  const { problems } = ctx;
  const sc = ctx.source.scenario;
  const species = kin.species;
  const colour = sc.output?.colour ?? kin.model?.display ?? species[0];
  if (colour !== undefined && species.length && !species.includes(colour)) problems.add(['output', 'colour'], `"${colour}" is not a species (${species.join(', ')})`);
  const colormap = (sc.output?.colormap ?? DEFAULT_COLORMAP) as ColormapName;
  if (!COLORMAP_NAMES.includes(colormap)) problems.add(['output', 'colormap'], `unknown colormap "${colormap}"; choose one of ${COLORMAP_NAMES.join(', ')}`);
  const range = sc.output?.range ?? 'frame';
  if (Array.isArray(range) && !(range[1] > range[0])) problems.add(['output', 'range'], `[min, max] needs max > min, got [${range.join(', ')}]`);
  const measured = sc.analysis?.species ?? colour;
  if (sc.analysis?.species !== undefined && species.length && !species.includes(sc.analysis.species)) problems.add(['analysis', 'species'], `"${sc.analysis.species}" is not a species (${species.join(', ')})`);
  return { colour: colour!, colormap, range, measured: measured! };
}

/** Outputs every `output.every` (a whole number of steps; end/OUTPUTS_PER_RUN by default) and the pattern measures' plan. */
export function resolveOutputPlan(ctx: ResolveContext, painting: Painting, time: TimePlan, vertices: number): { output: OutputPlan; analysis: AnalysisPlan } {
  const sc = ctx.source.scenario;
  const step = time.dt;
  const every = sc.output?.every ?? time.end / OUTPUTS_PER_RUN;
  const everySteps = Math.max(1, Math.round(every / step));
  if (Math.abs(everySteps * step - every) > 1e-9 * every) ctx.warnings.push(`output.every ${every} is not a whole number of steps of ${step}; frames come every ${everySteps} steps (${everySteps * step})`);
  const output: OutputPlan = {
    formats: (sc.output?.formats ?? []).filter((f): f is 'glb' | 'obj' | 'csv' => f !== 'ply'),
    every: everySteps * step,
    everySteps,
    colour: painting.colour,
    colormap: painting.colormap,
    range: painting.range,
    frames: sc.output?.frames ?? true,
  };
  const analysis: AnalysisPlan = {
    species: painting.measured,
    threshold: sc.analysis?.threshold ?? DEFAULT_THRESHOLD_RULE,
    modes: Math.min(sc.analysis?.modes ?? (vertices <= AUTO_SPECTRUM_VERTICES ? AUTO_SPECTRUM_MODES : 0), vertices - 1),
    floor: sc.analysis?.floor !== undefined ? { absolute: sc.analysis.floor, relative: 0 } : { absolute: PATTERN_NOISE_FACTOR * noiseOn(sc.initial?.noise, painting.measured), relative: PATTERN_RELATIVE_FLOOR },
  };
  return { output, analysis };
}

/** The amplitude of the starting noise on one species (0 when it has none). */
function noiseOn(noise: number | { amplitude: number; species?: string[] } | undefined, species: string): number {
  if (noise === undefined) return 0;
  const targets = noiseTargets(noise, [species]);
  return targets.species.includes(species) ? targets.amplitude : 0;
}
