/**
 * The scenario panel: tissue, mechanism, growth, start and clock, as a form
 * that writes a scenario (the same YAML the command line runs), with live
 * checks of every formula. A text mode takes any scenario as written.
 */
import { stringify } from 'yaml';
import { SHAPES } from '../../meshes/shapes/index.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import { parseFormula } from '../../solver/kinetics/parseFormula.ts';
import type { Scenario } from '../../solver/scenario/Scenario.ts';
import { el } from './dom.ts';

export interface OpenedMesh {
  name: string;
  vertices: number;
}

const CUSTOM = 'own formulas';

/** A sensible end time for a model: 10 000 of its suggested steps. */
const defaultEnd = (model: string) => 10_000 * (MODELS[model]?.suggestedStep ?? 1);

export class ScenarioForm {
  readonly root: HTMLElement;
  private mesh: OpenedMesh | undefined;
  private readonly onChange: () => void;
  private textMode = false;
  readonly text: HTMLTextAreaElement;
  private readonly formulaMessages: HTMLElement;

  // tissue
  private readonly source = el('select', { id: 'tissue-source', 'aria-label': 'tissue source' });
  private readonly shape = el('select', { id: 'tissue-shape', 'aria-label': 'shape' });
  private readonly shapeParams = el('div', { class: 'fields', id: 'shape-params' });
  private readonly vertices = el('input', { id: 'tissue-vertices', type: 'number', min: 50, step: 100, value: 6000 });
  // mechanism
  private readonly model = el('select', { id: 'mechanism-model', 'aria-label': 'kinetics' });
  private readonly speciesInput = el('input', { id: 'mechanism-species', type: 'text', value: 'u, v' });
  private readonly custom = el('div', { class: 'fields', id: 'own-formulas' });
  private readonly params = el('div', { class: 'fields', id: 'mechanism-params' });
  private readonly diffusion = el('div', { class: 'fields', id: 'mechanism-diffusion' });
  // growth
  private readonly law = el('select', { id: 'growth-law', 'aria-label': 'growth law' });
  private readonly rate = el('input', { id: 'growth-rate', type: 'text', value: '0.0001' });
  private readonly rates = el('input', { id: 'growth-rates', type: 'text', value: '0.0002, 0, 0', title: 'relative growth rates along x, y, z' });
  private readonly refine = el('input', { id: 'growth-refine', type: 'checkbox', checked: true });
  // start
  private readonly seed = el('input', { id: 'start-seed', type: 'number', value: 7, min: 0 });
  private readonly noise = el('input', { id: 'start-noise', type: 'text', value: '0.01' });
  private readonly spots = el('input', { id: 'start-spots', type: 'number', value: 6, min: 0 });
  private readonly spotRadius = el('input', { id: 'start-spot-radius', type: 'text', value: '0.03' });
  private readonly spotValues = el('div', { class: 'fields', id: 'start-spot-values' });
  // clock
  private readonly scheme = el('select', { id: 'clock-scheme', 'aria-label': 'scheme' });
  private readonly step = el('input', { id: 'clock-step', type: 'text', value: '1', placeholder: 'auto' });
  private readonly end = el('input', { id: 'clock-end', type: 'text', value: '8000' });
  private readonly every = el('input', { id: 'clock-every', type: 'text', value: '200' });

  constructor(onChange: () => void) {
    this.onChange = onChange;
    for (const s of ['built-in shape', 'opened mesh file']) this.source.append(el('option', { value: s, text: s }));
    for (const s of Object.keys(SHAPES)) this.shape.append(el('option', { value: s, text: s, selected: s === 'sphere' }));
    for (const m of [...Object.keys(MODELS), CUSTOM]) this.model.append(el('option', { value: m, text: m === CUSTOM ? 'own formulas…' : `${m} — ${MODELS[m].title.split(':')[0]}`, selected: m === 'gray-scott' }));
    for (const l of ['none', 'uniform', 'anisotropic']) this.law.append(el('option', { value: l, text: l }));
    for (const s of ['imex', 'explicit']) this.scheme.append(el('option', { value: s, text: s === 'imex' ? 'implicit–explicit' : 'explicit' }));
    this.text = el('textarea', { id: 'scenario-text', spellcheck: false, rows: 16, 'aria-label': 'scenario text' });
    this.formulaMessages = el('div', { class: 'messages', id: 'formula-messages', role: 'status' });
    const section = (title: string, ...rows: Node[]) => el('details', { open: true, class: 'section' }, el('summary', { text: title }), ...rows);
    const row = (label: string, input: HTMLElement, hint?: string) => el('label', { class: 'row' }, el('span', { text: label }), input, hint ? el('small', { text: hint }) : null);
    this.root = el('form', { id: 'scenario-form', autocomplete: 'off' },
      section('Tissue',
        row('from', this.source),
        row('shape', this.shape),
        this.shapeParams,
        row('vertices', this.vertices, 'target count'),
        el('p', { class: 'hint', id: 'mesh-file-hint', text: 'Open a mesh file (PLY, OBJ, STL, OFF) with the button above, or drop it on the surface.' }),
      ),
      section('Mechanism',
        row('kinetics', this.model),
        el('div', { id: 'own-species-row' }, row('species', this.speciesInput, 'names, comma-separated')),
        this.custom,
        el('h4', { text: 'parameters' }), this.params,
        el('h4', { text: 'diffusion' }), this.diffusion,
        this.formulaMessages,
      ),
      section('Growth',
        row('law', this.law),
        row('rate', this.rate, 'relative length growth per unit time'),
        row('rates x, y, z', this.rates),
        row('refine', this.refine, 'split triangles as they stretch'),
      ),
      section('Start',
        row('seed', this.seed),
        row('noise', this.noise, 'uniform ±amplitude'),
        row('spots', this.spots, 'count'),
        row('spot radius', this.spotRadius),
        this.spotValues,
      ),
      section('Clock',
        row('scheme', this.scheme),
        row('step', this.step, 'empty: automatic'),
        row('end time', this.end),
        row('frame every', this.every),
      ),
      el('details', { class: 'section', id: 'text-section' },
        el('summary', { text: 'Scenario text' }),
        el('p', { class: 'warning', id: 'text-mode-note', text: 'The scenario text is in use: the form above is not. “Back to the form” returns to it.' }),
        el('p', { class: 'hint', text: 'The scenario the form writes. Edit it, or paste any scenario, then press “Set up from text”.' }),
        this.text,
        el('button', { type: 'button', id: 'use-text', text: 'Set up from text' }),
        el('button', { type: 'button', id: 'use-form', text: 'Back to the form' }),
      ),
    );
    this.root.addEventListener('submit', (e) => e.preventDefault());
    this.root.addEventListener('input', (e) => {
      if (e.target === this.text) return;
      if (e.target === this.shape) this.fillShapeParams();
      if (e.target === this.model) this.fillModel();
      if (e.target === this.speciesInput) this.fillCustom();
      this.changed();
    });
    this.root.querySelector('#use-form')!.addEventListener('click', () => { this.textMode = false; this.root.classList.remove('text-mode'); this.changed(); });
    this.fillShapeParams();
    this.fillModel();
    (this.shapeParams.querySelector('[data-param="radius"]') as HTMLInputElement).value = '0.25';
    this.setParam('F', '0.03');
    this.setParam('k', '0.062');
    this.changed();
  }

  /** The text to run: the form's scenario, or the text as edited. */
  scenarioText(): string {
    return this.textMode ? this.text.value : this.text.value = this.write();
  }

  useText(text?: string): void {
    if (text !== undefined) this.text.value = text;
    this.textMode = true;
    this.root.classList.add('text-mode');
    (this.root.querySelector('#text-section') as HTMLDetailsElement).open = true;
  }

  get inTextMode(): boolean {
    return this.textMode;
  }

  setMesh(mesh: OpenedMesh | undefined): void {
    this.mesh = mesh;
    if (mesh) this.source.value = 'opened mesh file';
    (this.root.querySelector('#mesh-file-hint') as HTMLElement).textContent = mesh ? `opened: ${mesh.name} (${mesh.vertices} vertices)` : 'Open a mesh file (PLY, OBJ, STL, OFF) with the button above, or drop it on the surface.';
    this.changed();
  }

  setParam(name: string, value: string): void {
    const input = this.params.querySelector(`[data-param="${name}"]`) as HTMLInputElement | null;
    if (input) input.value = value;
  }

  /** Species names of the current mechanism. */
  species(): string[] {
    return this.model.value === CUSTOM ? this.speciesInput.value.split(',').map((s) => s.trim()).filter(Boolean) : [...MODELS[this.model.value].species];
  }

  /** The values the seed brush sets (the spot values), per species; null leaves a species alone. */
  spotValuesBySpecies(): (number | null)[] {
    return this.species().map((s) => {
      const input = this.spotValues.querySelector(`[data-species="${s}"]`) as HTMLInputElement | null;
      const v = input && input.value.trim() !== '' ? Number(input.value) : NaN;
      return Number.isFinite(v) ? v : null;
    });
  }

  private changed() {
    const own = this.model.value === CUSTOM;
    (this.root.querySelector('#own-species-row') as HTMLElement).hidden = !own;
    this.custom.hidden = !own;
    const fromShape = this.source.value === 'built-in shape';
    this.shape.disabled = !fromShape;
    this.vertices.disabled = !fromShape;
    this.shapeParams.hidden = !fromShape;
    const law = this.law.value;
    this.rate.disabled = law !== 'uniform';
    this.rates.disabled = law !== 'anisotropic';
    this.refine.disabled = law === 'none';
    this.checkFormulas();
    if (!this.textMode) this.text.value = this.write();
    this.onChange();
  }

  private fillShapeParams() {
    this.shapeParams.replaceChildren();
    const def = SHAPES[this.shape.value];
    for (const [k, p] of Object.entries(def.parameters)) {
      if (k === 'frequency' || k === 'cells') continue; // chosen from the vertex target
      this.shapeParams.append(el('label', { class: 'row' }, el('span', { text: k }), el('input', { type: 'number', step: 'any', value: p.default, 'data-param': k, title: p.description })));
    }
  }

  private fillModel() {
    const own = this.model.value === CUSTOM;
    if (own) this.fillCustom();
    const m = MODELS[this.model.value];
    this.params.replaceChildren();
    if (m) for (const [k, p] of Object.entries(m.parameters)) this.params.append(this.fieldRow(k, String(p.default), p.description, 'param'));
    this.fillDiffusion();
    if (m) {
      const end = defaultEnd(this.model.value);
      this.end.value = String(end);
      this.every.value = String(Number((end / 40).toPrecision(3)));
      this.step.value = String(m.suggestedStep ?? '');
      this.scheme.value = 'imex';
      const gs = this.model.value === 'gray-scott';
      this.spots.value = gs ? '6' : '0';
      this.noise.value = '0.01';
    }
    this.fillSpotValues();
  }

  private fillCustom() {
    const species = this.species();
    const old = Object.fromEntries([...this.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')].map((i) => [i.dataset.reaction!, i.value]));
    this.custom.replaceChildren(...species.map((s, k) => el('label', { class: 'row' }, el('span', { text: `d${s}/dt =` }), el('input', { type: 'text', 'data-reaction': s, value: old[s] ?? (k === 0 ? `a - ${s} + ${s}^2*${species[1] ?? s}` : `b - ${species[0]}^2*${s}`), class: 'formula' }))));
    const oldParams = Object.fromEntries([...this.params.querySelectorAll<HTMLInputElement>('[data-param]')].map((i) => [i.dataset.param!, i.value]));
    this.params.replaceChildren(
      ...Object.entries({ a: '0.1', b: '0.9', ...oldParams }).map(([k, v]) => this.fieldRow(k, v, 'parameter', 'param')),
      el('button', { type: 'button', id: 'add-parameter', text: '+ parameter' }),
    );
    this.params.querySelector('#add-parameter')!.addEventListener('click', () => {
      const name = prompt('parameter name (a letter, then letters, digits or _)');
      if (name && /^[A-Za-z][A-Za-z0-9_]*$/.test(name)) {
        this.params.insertBefore(this.fieldRow(name, '1', 'parameter', 'param'), this.params.lastChild);
        this.changed();
      }
    });
    this.fillDiffusion();
    this.fillSpotValues();
  }

  private fillDiffusion() {
    const m = MODELS[this.model.value];
    this.diffusion.replaceChildren(...this.species().map((s, k) => this.fieldRow(s, m ? String(m.diffusion[s]) : k === 0 ? '1' : '40', `diffusion of ${s}`, 'diffusion')));
  }

  private fillSpotValues() {
    const gs = this.model.value === 'gray-scott';
    const defaults: Record<string, string> = gs ? { u: '0.5', v: '0.25' } : {};
    this.spotValues.replaceChildren(...this.species().map((s) => el('label', { class: 'row' }, el('span', { text: `spot ${s}` }), el('input', { type: 'text', 'data-species': s, value: defaults[s] ?? '', placeholder: 'unchanged' }))));
  }

  private fieldRow(name: string, value: string, title: string, kind: 'param' | 'diffusion'): HTMLElement {
    return el('label', { class: 'row' }, el('span', { text: name }), el('input', { type: 'text', value, title, class: 'formula', [`data-${kind}`]: name }));
  }

  /** Parse every formula as it is typed; messages name the field and the column. */
  private checkFormulas() {
    const species = this.species();
    const params = [...this.params.querySelectorAll<HTMLInputElement>('[data-param]')].map((i) => i.dataset.param!);
    const messages: string[] = [];
    const check = (input: HTMLInputElement, what: string, symbols: string[]) => {
      input.classList.remove('invalid');
      const t = input.value.trim();
      if (t === '' || Number.isFinite(Number(t))) return;
      try {
        parseFormula(t, new Set(symbols));
      } catch (e) {
        input.classList.add('invalid');
        messages.push(`${what}: ${(e as Error).message}`);
      }
    };
    for (const i of this.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')) check(i, `d${i.dataset.reaction}/dt`, [...species, ...params, 'x', 'y', 'z', 't']);
    for (const i of this.params.querySelectorAll<HTMLInputElement>('[data-param]')) check(i, `parameter ${i.dataset.param}`, ['x', 'y', 'z']);
    for (const i of this.diffusion.querySelectorAll<HTMLInputElement>('[data-diffusion]')) check(i, `diffusion of ${i.dataset.diffusion}`, [...params, 'x', 'y', 'z']);
    if (this.model.value === CUSTOM && new Set(species).size !== species.length) messages.push('species: each name once');
    // number fields: flagged where they are, never written as NaN
    for (const [input, what] of this.numberFields()) {
      input.classList.remove('invalid');
      if (input.disabled) continue;
      const parts = input === this.rates ? input.value.split(',') : [input.value];
      if (parts.some((t) => !Number.isFinite(Number(t.trim())) || t.trim() === '') || (input === this.rates && parts.length !== 3)) {
        input.classList.add('invalid');
        messages.push(`${what}: ${input === this.rates ? 'three numbers, e.g. 0.0002, 0, 0' : `a number, not "${input.value.trim()}"`}`);
      }
    }
    this.formulaMessages.replaceChildren(...messages.map((m) => el('p', { class: 'error', text: m })));
  }

  /** The form's number fields with the words that name them (the time step may be left empty: automatic). */
  private numberFields(): [HTMLInputElement, string][] {
    const fields: [HTMLInputElement, string][] = [[this.vertices, 'vertices'], [this.noise, 'noise'], [this.spots, 'spots'], [this.spotRadius, 'spot radius'], [this.end, 'end time'], [this.every, 'frame every'], [this.rate, 'growth rate'], [this.rates, 'growth rates']];
    if (this.step.value.trim() !== '') fields.push([this.step, 'step']);
    return fields;
  }

  /** A number field's value, or its text when it is not a number (the scenario's check then names it; never NaN). */
  private static number(input: HTMLInputElement): number {
    const t = input.value.trim();
    return (t !== '' && Number.isFinite(Number(t)) ? Number(t) : t) as number;
  }

  /** Number if the text is one, else the text (a formula). */
  private static value(t: string): number | string {
    const s = t.trim();
    return s !== '' && Number.isFinite(Number(s)) ? Number(s) : s;
  }

  /** The scenario the form describes, as YAML. */
  write(): string {
    const num = ScenarioForm.number;
    const sc: Scenario = { name: 'viewer', seed: Number(this.seed.value) || 0, mesh: {}, kinetics: {}, time: { end: num(this.end) } } as Scenario;
    if (this.source.value === 'built-in shape') {
      const params: Record<string, number> = {};
      for (const i of this.shapeParams.querySelectorAll<HTMLInputElement>('[data-param]')) {
        const def = SHAPES[this.shape.value]?.parameters[i.dataset.param!];
        if (def && Number(i.value) !== def.default) params[i.dataset.param!] = Number(i.value);
      }
      sc.mesh = { shape: this.shape.value, ...(Object.keys(params).length ? { params } : {}), vertices: Number.isFinite(Number(this.vertices.value)) ? Math.round(Number(this.vertices.value)) : num(this.vertices) };
    } else {
      sc.mesh = { file: this.mesh?.name ?? 'open-a-mesh-file.ply' };
    }
    const parameters: Record<string, number | string> = {};
    for (const i of this.params.querySelectorAll<HTMLInputElement>('[data-param]')) parameters[i.dataset.param!] = ScenarioForm.value(i.value);
    if (this.model.value === CUSTOM) {
      const reactions: Record<string, string> = {};
      for (const i of this.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')) reactions[i.dataset.reaction!] = i.value.trim();
      sc.kinetics = { species: this.species(), reactions, parameters };
    } else {
      sc.kinetics = { model: this.model.value, parameters };
    }
    const diffusion: Record<string, number | string> = {};
    const m = MODELS[this.model.value];
    for (const i of this.diffusion.querySelectorAll<HTMLInputElement>('[data-diffusion]')) {
      const v = ScenarioForm.value(i.value);
      if (!m || String(m.diffusion[i.dataset.diffusion!]) !== String(v)) diffusion[i.dataset.diffusion!] = v;
    }
    if (Object.keys(diffusion).length) sc.diffusion = diffusion;
    const initial: NonNullable<Scenario['initial']> = { values: 'steady' };
    const noise = num(this.noise);
    if (typeof noise !== 'number' || noise > 0) initial.noise = noise;
    const count = Math.round(Number(this.spots.value));
    const values: Record<string, number> = {};
    this.species().forEach((s, k) => { const v = this.spotValuesBySpecies()[k]; if (v !== null) values[s] = v; });
    if (count > 0 && Object.keys(values).length) initial.spots = { count, radius: num(this.spotRadius), values };
    sc.initial = initial;
    sc.time = { scheme: this.scheme.value as 'imex' | 'explicit', ...(this.step.value.trim() ? { step: num(this.step) } : {}), end: num(this.end) };
    sc.output = { every: num(this.every), colour: m?.display ?? this.species()[this.species().length - 1] };
    const law = this.law.value;
    if (law === 'uniform') sc.growth = { law: 'uniform', rate: num(this.rate) };
    if (law === 'anisotropic') sc.growth = { law: 'anisotropic', rates: this.rates.value.split(',').map((t) => (Number.isFinite(Number(t.trim())) && t.trim() !== '' ? Number(t.trim()) : t.trim())) as unknown as [number, number, number] };
    if (sc.growth && this.refine.checked) sc.growth.refine = { edgeGrowth: 1.6 };
    return `# written by the Placode viewer; run it with: placode run scenario.yaml --out DIR\n${stringify(sc)}`;
  }
}
