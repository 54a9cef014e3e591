/** The form's settings written as a scenario: the YAML the command line runs. */
import { stringify } from 'yaml';
import { SHAPES } from '../../meshes/shapes/index.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import type { Scenario } from '../../solver/scenario/Scenario.ts';
import { FORM_EDGE_GROWTH, type FormFields } from './formFields.ts';
import type { OpenedMesh } from './scenarioForm.ts';

/** A number field's value, or its text when it is not a number (the scenario's check then names it; never NaN). */
export function number(input: HTMLInputElement): number {
  const t = input.value.trim();
  return (t !== '' && Number.isFinite(Number(t)) ? Number(t) : t) as number;
}

/** Number if the text is one, else the text (a formula). */
export function value(t: string): number | string {
  const s = t.trim();
  return s !== '' && Number.isFinite(Number(s)) ? Number(s) : s;
}

/** The scenario the form describes, as YAML (the same text the command line runs). */
export function scenarioFromForm(f: FormFields, o: { mesh: OpenedMesh | undefined; custom: boolean; species: string[]; spotValues: (number | null)[]; startValues: Record<string, string> }): string {
  const num = number;
  const sc: Scenario = { name: 'viewer', seed: Number(f.seed.value) || 0, mesh: {}, kinetics: {}, time: { end: num(f.end) } } as Scenario;
  if (f.source.value === 'built-in shape') {
    const params: Record<string, number> = {};
    for (const i of f.shapeParams.querySelectorAll<HTMLInputElement>('[data-param]')) {
      const def = SHAPES[f.shape.value]?.parameters[i.dataset.param!];
      if (def && Number(i.value) !== def.default) params[i.dataset.param!] = Number(i.value);
    }
    sc.mesh = { shape: f.shape.value, ...(Object.keys(params).length ? { params } : {}), vertices: Number.isFinite(Number(f.vertices.value)) ? Math.round(Number(f.vertices.value)) : num(f.vertices) };
  } else {
    sc.mesh = { file: o.mesh?.name ?? 'open-a-mesh-file.ply' };
  }
  const parameters: Record<string, number | string> = {};
  for (const i of f.params.querySelectorAll<HTMLInputElement>('[data-param]')) parameters[i.dataset.param!] = value(i.value);
  if (o.custom) {
    const reactions: Record<string, string> = {};
    for (const i of f.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')) reactions[i.dataset.reaction!] = i.value.trim();
    sc.kinetics = { species: o.species, reactions, parameters };
  } else {
    sc.kinetics = { model: f.model.value, parameters };
  }
  const diffusion: Record<string, number | string> = {};
  const m = MODELS[f.model.value];
  for (const i of f.diffusion.querySelectorAll<HTMLInputElement>('[data-diffusion]')) {
    const v = value(i.value);
    if (!m || String(m.diffusion[i.dataset.diffusion!]) !== String(v)) diffusion[i.dataset.diffusion!] = v;
  }
  if (Object.keys(diffusion).length) sc.diffusion = diffusion;
  const initial: NonNullable<Scenario['initial']> = { values: o.custom ? Object.fromEntries(Object.entries(o.startValues).map(([k, v]) => [k, value(v)])) : 'steady' };
  const noise = num(f.noise);
  if (typeof noise !== 'number' || noise > 0) initial.noise = noise;
  const count = Math.round(Number(f.spots.value));
  const values: Record<string, number> = {};
  o.species.forEach((s, k) => { const v = o.spotValues[k]; if (v !== null) values[s] = v; });
  if (count > 0 && Object.keys(values).length) initial.spots = { count, radius: num(f.spotRadius), values };
  sc.initial = initial;
  sc.time = { scheme: f.scheme.value as 'imex' | 'explicit', ...(f.step.value.trim() ? { step: num(f.step) } : {}), end: num(f.end) };
  sc.output = { every: num(f.every), colour: m?.display ?? o.species[o.species.length - 1] };
  const law = f.law.value;
  if (law === 'uniform') sc.growth = { law: 'uniform', rate: num(f.rate) };
  if (law === 'anisotropic') sc.growth = { law: 'anisotropic', rates: f.rates.value.split(',').map((t) => (Number.isFinite(Number(t.trim())) && t.trim() !== '' ? Number(t.trim()) : t.trim())) as unknown as [number, number, number] };
  if (sc.growth && f.refine.checked) sc.growth.refine = { edgeGrowth: FORM_EDGE_GROWTH };
  return `# written by the Placode viewer; run it with: placode run scenario.yaml --out DIR\n${stringify(sc)}`;
}
