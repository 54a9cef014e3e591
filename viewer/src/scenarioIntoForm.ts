/**
 * A scenario's settings put into the form's fields, as far as the form can
 * hold them; what it cannot (a mesh file, a growth centre, an own time course,
 * analysis settings…) is listed, so the page can say the run goes by the text.
 */
import { SHAPES } from '../../meshes/shapes/index.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import type { Scenario } from '../../solver/scenario/Scenario.ts';
import { FORM_EDGE_GROWTH, type FormFields } from './formFields.ts';

/** The form's own steps that rebuild rows after a choice (shape parameters, a model's parameters, own formulas). */
export interface FormRebuild {
  shapeChosen(): void;
  modelChosen(): void;
  customSpecies(): void;
  customModel: string;
  /** a parameter row of the own formulas */
  paramRow(name: string, value: string): HTMLElement;
}

const text = (v: unknown) => (typeof v === 'number' || typeof v === 'string' ? String(v) : undefined);

/** Fill the fields from a scenario; returns the keys (dotted paths) the form could not show. */
export function scenarioIntoForm(f: FormFields, sc: Scenario, rebuild: FormRebuild): string[] {
  const unshown: string[] = [];
  const rest = (section: string, value: object | undefined, shown: string[]) => {
    for (const k of Object.keys(value ?? {})) if (!shown.includes(k)) unshown.push(`${section}.${k}`);
  };
  for (const k of Object.keys(sc)) if (!['name', 'seed', 'mesh', 'kinetics', 'diffusion', 'initial', 'time', 'output', 'growth'].includes(k)) unshown.push(k);
  // tissue
  const mesh = sc.mesh ?? {};
  if (mesh.shape && SHAPES[mesh.shape]) {
    f.source.value = 'built-in shape';
    f.shape.value = mesh.shape;
    rebuild.shapeChosen();
    for (const [k, v] of Object.entries(mesh.params ?? {})) {
      const input = f.shapeParams.querySelector<HTMLInputElement>(`[data-param="${k}"]`);
      if (input) input.value = String(v);
      else unshown.push(`mesh.params.${k}`);
    }
    if (mesh.vertices !== undefined) f.vertices.value = String(mesh.vertices);
    rest('mesh', mesh, ['shape', 'params', 'vertices']);
  } else unshown.push(...Object.keys(mesh).map((k) => `mesh.${k}`));
  // mechanism
  const kin = sc.kinetics ?? {};
  if (kin.model && MODELS[kin.model]) {
    f.model.value = kin.model;
    rebuild.modelChosen();
  } else if (kin.species && kin.reactions) {
    f.model.value = rebuild.customModel;
    f.speciesInput.value = kin.species.join(', ');
    rebuild.customSpecies();
    for (const [s, formula] of Object.entries(kin.reactions)) {
      const input = f.custom.querySelector<HTMLInputElement>(`[data-reaction="${s}"]`);
      if (input) input.value = formula;
    }
    // the own formulas' parameters: exactly those given
    for (const input of f.params.querySelectorAll<HTMLInputElement>('[data-param]')) if (!(input.dataset.param! in (kin.parameters ?? {}))) input.closest('label')?.remove();
  }
  for (const [k, v] of Object.entries(kin.parameters ?? {})) {
    const input = f.params.querySelector<HTMLInputElement>(`[data-param="${k}"]`);
    const t = text(v);
    if (input && t !== undefined) input.value = t;
    else if (kin.species && t !== undefined) {
      f.params.querySelector('#add-parameter')?.before(rebuild.paramRow(k, t));
    } else unshown.push(`kinetics.parameters.${k}`);
  }
  rest('kinetics', kin, ['model', 'species', 'reactions', 'parameters']);
  for (const [s, v] of Object.entries(sc.diffusion ?? {})) {
    const input = f.diffusion.querySelector<HTMLInputElement>(`[data-diffusion="${s}"]`);
    const t = text(v);
    if (input && t !== undefined) input.value = t;
    else unshown.push(`diffusion.${s}`);
  }
  // start
  if (sc.seed !== undefined) f.seed.value = String(sc.seed);
  const init = sc.initial ?? {};
  if (typeof init.noise === 'number') f.noise.value = String(init.noise);
  else if (init.noise !== undefined) unshown.push('initial.noise');
  else f.noise.value = '0';
  if (init.spots) {
    f.spots.value = String(init.spots.count ?? 0);
    if (init.spots.radius !== undefined) f.spotRadius.value = String(init.spots.radius);
    for (const [s, v] of Object.entries(init.spots.values ?? {})) {
      const input = f.spotValues.querySelector<HTMLInputElement>(`[data-species="${s}"]`);
      if (input) input.value = String(v);
    }
    rest('initial.spots', init.spots, ['count', 'radius', 'values']);
  } else f.spots.value = '0';
  if (init.values !== undefined && init.values !== 'steady') {
    if (typeof init.values === 'object' && kin.species) {
      for (const [sp, v] of Object.entries(init.values)) {
        const input = f.startValues.querySelector<HTMLInputElement>(`[data-start="${sp}"]`);
        if (input && text(v) !== undefined) input.value = text(v)!;
        else unshown.push(`initial.values.${sp}`);
      }
    } else unshown.push('initial.values');
  }
  rest('initial', init, ['values', 'noise', 'spots']);
  // clock
  const time = sc.time ?? {};
  if (time.scheme) f.scheme.value = time.scheme;
  f.step.value = time.step !== undefined ? String(time.step) : '';
  if (time.end !== undefined) f.end.value = String(time.end);
  rest('time', time, ['scheme', 'step', 'end']);
  if (sc.output?.every !== undefined) f.every.value = String(sc.output.every);
  rest('output', sc.output, ['every', 'colour']);
  const species = kin.model && MODELS[kin.model] ? MODELS[kin.model].species : kin.species ?? [];
  const painted = (kin.model && MODELS[kin.model]?.display) || species[species.length - 1];
  if (sc.output?.colour !== undefined && sc.output.colour !== painted) unshown.push('output.colour');
  // growth
  const g = sc.growth;
  f.law.value = !g ? 'none' : g.law === 'uniform' || g.law === 'anisotropic' ? g.law : 'none';
  if (g && f.law.value === 'none') unshown.push(`growth (law: ${g.law})`);
  if (g?.rate !== undefined) f.rate.value = String(g.rate);
  if (g?.rates) f.rates.value = g.rates.join(', ');
  f.refine.checked = !!g?.refine;
  if (g?.refine && (g.refine.edgeGrowth !== FORM_EDGE_GROWTH || Object.keys(g.refine).length > 1)) unshown.push('growth.refine');
  if (g) rest('growth', g, ['law', 'rate', 'rates', 'refine']);
  return unshown;
}
