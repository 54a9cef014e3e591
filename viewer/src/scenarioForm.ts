/**
 * The scenario panel: tissue, mechanism, growth, start and clock, as a form
 * that writes a scenario (the same YAML the command line runs), with live
 * checks of every formula. A text mode takes any scenario as written.
 */
import { SHAPES } from '../../meshes/shapes/index.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import { parseFormula } from '../../solver/kinetics/parseFormula.ts';
import { el } from './dom.ts';
import { createFormFields, row, section } from './formFields.ts';
import { scenarioFromForm } from './scenarioFromForm.ts';
import { scenarioIntoForm } from './scenarioIntoForm.ts';
import { parse } from 'yaml';
import type { Scenario } from '../../solver/scenario/Scenario.ts';

export interface OpenedMesh {
  name: string;
  vertices: number;
}

const CUSTOM = 'own formulas';
const TEXT_NOTE = 'The scenario text is in use: the form above is not. “Back to the form” returns to it.';

/** A sensible end time for a model: 10 000 of its suggested steps. */
const defaultEnd = (model: string) => 10_000 * (MODELS[model]?.suggestedStep ?? 1);

export class ScenarioForm {
  readonly root: HTMLElement;
  private mesh: OpenedMesh | undefined;
  private readonly onChange: () => void;
  private textMode = false;
  readonly text: HTMLTextAreaElement;
  private readonly formulaMessages: HTMLElement;

  private readonly f = createFormFields();

  constructor(onChange: () => void) {
    this.onChange = onChange;
    for (const s of ['built-in shape', 'opened mesh file']) this.f.source.append(el('option', { value: s, text: s }));
    for (const s of Object.keys(SHAPES)) this.f.shape.append(el('option', { value: s, text: s, selected: s === 'sphere' }));
    for (const m of [...Object.keys(MODELS), CUSTOM]) this.f.model.append(el('option', { value: m, text: m === CUSTOM ? 'own formulas…' : MODELS[m].title.split(':')[0], title: m === CUSTOM ? 'your own species and rate formulas' : `${MODELS[m].title} (model: ${m})`, selected: m === 'gray-scott' }));
    for (const l of ['none', 'uniform', 'anisotropic']) this.f.law.append(el('option', { value: l, text: l }));
    for (const s of ['imex', 'explicit']) this.f.scheme.append(el('option', { value: s, text: s === 'imex' ? 'implicit–explicit' : 'explicit' }));
    this.text = el('textarea', { id: 'scenario-text', spellcheck: false, rows: 16, 'aria-label': 'scenario text' });
    this.formulaMessages = el('div', { class: 'messages', id: 'formula-messages', role: 'status' });
    this.root = el('form', { id: 'scenario-form', autocomplete: 'off' },
      section('Tissue',
        row('from', this.f.source),
        row('shape', this.f.shape),
        this.f.shapeParams,
        row('vertices', this.f.vertices, 'target count'),
        el('p', { class: 'hint', id: 'mesh-file-hint', text: 'Open a mesh file (PLY, OBJ, STL, OFF) with the button above, or drop it on the surface.' }),
      ),
      section('Mechanism',
        row('kinetics', this.f.model),
        el('div', { id: 'own-species-row' }, row('species', this.f.speciesInput, 'names, comma-separated')),
        this.f.custom,
        el('h4', { text: 'parameters' }), this.f.params,
        el('h4', { text: 'diffusion' }), this.f.diffusion,
        this.formulaMessages,
      ),
      section('Growth',
        row('law', this.f.law),
        row('rate', this.f.rate, 'relative length growth per unit time'),
        row('rates x, y, z', this.f.rates),
        row('refine', this.f.refine, 'split triangles as they stretch'),
      ),
      section('Start',
        this.f.startValues,
        row('seed', this.f.seed),
        row('noise', this.f.noise, 'uniform ±amplitude'),
        row('spots', this.f.spots, 'count'),
        row('spot radius', this.f.spotRadius),
        this.f.spotValues,
      ),
      section('Clock',
        row('scheme', this.f.scheme),
        row('step', this.f.step, 'empty: automatic'),
        row('end time', this.f.end),
        row('frame every', this.f.every),
      ),
      el('details', { class: 'section', id: 'text-section' },
        el('summary', { text: 'Scenario text' }),
        el('p', { class: 'warning', id: 'text-mode-note', text: TEXT_NOTE }),
        el('p', { class: 'hint', text: 'The scenario the form writes. Edit it, or paste any scenario, then press “Set up from text”.' }),
        this.text,
        el('button', { type: 'button', id: 'use-text', text: 'Set up from text' }),
        el('button', { type: 'button', id: 'use-form', text: 'Back to the form' }),
      ),
    );
    this.root.addEventListener('submit', (e) => e.preventDefault());
    this.root.addEventListener('input', (e) => {
      if (e.target === this.text) return;
      if (e.target === this.f.shape) this.fillShapeParams();
      if (e.target === this.f.model) this.fillModel();
      if (e.target === this.f.speciesInput) this.fillCustom();
      this.changed();
    });
    this.root.querySelector('#use-form')!.addEventListener('click', () => { this.textMode = false; this.root.classList.remove('text-mode'); this.changed(); });
    this.text.addEventListener('input', () => { (this.root.querySelector('#text-mode-note') as HTMLElement).textContent = TEXT_NOTE; });
    this.fillShapeParams();
    this.fillModel();
    (this.f.shapeParams.querySelector('[data-param="radius"]') as HTMLInputElement).value = '0.25';
    this.setParam('F', '0.03');
    this.setParam('k', '0.062');
    this.changed();
  }

  /** The text to run: the form's scenario, or the text as edited. */
  scenarioText(): string {
    return this.textMode ? this.text.value : this.text.value = this.write();
  }

  /**
   * Show a scenario (an example, a run's): its settings in the fields where the form has them. When it
   * has settings the form cannot show, its text stays in use and the note says which; returns them.
   */
  showScenario(text: string): string[] {
    let sc: Scenario;
    try {
      sc = parse(text) as Scenario;
      if (!sc || typeof sc !== 'object') throw new Error('not a scenario');
    } catch {
      this.useText(text);
      return ['(the text is not a scenario the form can read)'];
    }
    this.textMode = true; // the text is not rewritten while the fields fill
    const unshown = scenarioIntoForm(this.f, sc, {
      shapeChosen: () => this.fillShapeParams(),
      modelChosen: () => this.fillModel(),
      customSpecies: () => this.fillCustom(),
      customModel: CUSTOM,
      paramRow: (name, value) => this.fieldRow(name, value, 'parameter', 'param'),
    });
    if (unshown.length) {
      this.useText(text);
      (this.root.querySelector('#text-mode-note') as HTMLElement).textContent = `This scenario runs from its text: the form shows its settings but not ${unshown.join(', ')}. “Back to the form” would run what the form shows instead.`;
    } else {
      this.textMode = false;
      this.root.classList.remove('text-mode');
    }
    this.changed();
    return unshown;
  }

  useText(text?: string): void {
    if (text !== undefined) this.text.value = text;
    this.textMode = true;
    this.root.classList.add('text-mode');
    (this.root.querySelector('#text-section') as HTMLDetailsElement).open = true;
    this.changed();
  }

  get inTextMode(): boolean {
    return this.textMode;
  }

  setMesh(mesh: OpenedMesh | undefined): void {
    this.mesh = mesh;
    if (mesh) this.f.source.value = 'opened mesh file';
    (this.root.querySelector('#mesh-file-hint') as HTMLElement).textContent = mesh ? `opened: ${mesh.name} (${mesh.vertices} vertices)` : 'Open a mesh file (PLY, OBJ, STL, OFF) with the button above, or drop it on the surface.';
    this.changed();
  }

  setParam(name: string, value: string): void {
    const input = this.f.params.querySelector(`[data-param="${name}"]`) as HTMLInputElement | null;
    if (input) input.value = value;
  }

  /** Species names of the current mechanism. */
  species(): string[] {
    return this.f.model.value === CUSTOM ? this.f.speciesInput.value.split(',').map((s) => s.trim()).filter(Boolean) : [...MODELS[this.f.model.value].species];
  }

  /** The values the seed brush sets (the spot values), per species; null leaves a species alone. */
  spotValuesBySpecies(): (number | null)[] {
    return this.species().map((s) => {
      const input = this.f.spotValues.querySelector(`[data-species="${s}"]`) as HTMLInputElement | null;
      const v = input && input.value.trim() !== '' ? Number(input.value) : NaN;
      return Number.isFinite(v) ? v : null;
    });
  }

  private changed() {
    const own = this.f.model.value === CUSTOM;
    (this.root.querySelector('#own-species-row') as HTMLElement).hidden = !own;
    this.f.custom.hidden = !own;
    // while the text is in use the fields only show it (disabled, so read-only and out of the tab order)
    for (const c of this.root.querySelectorAll<HTMLInputElement | HTMLSelectElement | HTMLButtonElement>('.section:not(#text-section) :is(input, select, button)')) c.disabled = this.textMode;
    const fromShape = this.f.source.value === 'built-in shape';
    this.f.shape.disabled ||= !fromShape;
    this.f.vertices.disabled ||= !fromShape;
    this.f.shapeParams.hidden = !fromShape;
    const law = this.f.law.value;
    this.f.rate.disabled ||= law !== 'uniform';
    this.f.rates.disabled ||= law !== 'anisotropic';
    this.f.refine.disabled ||= law === 'none';
    this.checkFormulas();
    if (!this.textMode) this.text.value = this.write();
    this.onChange();
  }

  private fillShapeParams() {
    this.f.shapeParams.replaceChildren();
    const def = SHAPES[this.f.shape.value];
    for (const [k, p] of Object.entries(def.parameters)) {
      if (k === 'frequency' || k === 'cells') continue; // chosen from the vertex target
      this.f.shapeParams.append(el('label', { class: 'row' }, el('span', { text: k, title: k }), el('input', { type: 'number', step: 'any', value: p.default, 'data-param': k, title: p.description })));
    }
  }

  private fillModel() {
    // own formulas: their parameter list (with "+ parameter") is made by fillCustom, and kept
    if (this.f.model.value === CUSTOM) {
      // a new mechanism: a clock that suits the default formulas (rates of order 1)
      this.f.step.value = '0.01';
      this.f.end.value = '20';
      this.f.every.value = '0.5';
      this.f.spots.value = '0';
      return this.fillCustom(false);
    }
    const m = MODELS[this.f.model.value];
    this.f.params.replaceChildren();
    if (m) for (const [k, p] of Object.entries(m.parameters)) this.f.params.append(this.fieldRow(k, String(p.default), p.description, 'param'));
    this.fillDiffusion();
    if (m) {
      const end = defaultEnd(this.f.model.value);
      this.f.end.value = String(end);
      this.f.every.value = String(Number((end / 40).toPrecision(3)));
      this.f.step.value = String(m.suggestedStep ?? '');
      this.f.scheme.value = 'imex';
      const gs = this.f.model.value === 'gray-scott';
      this.f.spots.value = gs ? '6' : '0';
      this.f.noise.value = '0.01';
    }
    this.fillStartRows();
  }

  /** Own formulas: a rate per species, the parameters (those typed before, unless a built-in model's), start values. */
  private fillCustom(keepParams = true) {
    const species = this.species();
    const old = Object.fromEntries([...this.f.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')].map((i) => [i.dataset.reaction!, i.value]));
    this.f.custom.replaceChildren(...species.map((s, k) => el('label', { class: 'row' }, el('span', { text: `d${s}/dt =` }), el('input', { type: 'text', 'data-reaction': s, value: old[s] ?? (k === 0 ? `a - ${s} + ${s}^2*${species[1] ?? s}` : `b - ${species[0]}^2*${s}`), class: 'formula' }))));
    const oldParams = keepParams ? Object.fromEntries([...this.f.params.querySelectorAll<HTMLInputElement>('[data-param]')].map((i) => [i.dataset.param!, i.value])) : {};
    this.f.params.replaceChildren(
      ...Object.entries({ a: '0.1', b: '0.9', ...oldParams }).map(([k, v]) => this.fieldRow(k, v, 'parameter', 'param')),
      el('button', { type: 'button', id: 'add-parameter', text: '+ parameter' }),
    );
    this.f.params.querySelector('#add-parameter')!.addEventListener('click', () => {
      const name = prompt('parameter name (a letter, then letters, digits or _)');
      if (name && /^[A-Za-z][A-Za-z0-9_]*$/.test(name)) {
        this.f.params.insertBefore(this.fieldRow(name, '1', 'parameter', 'param'), this.f.params.lastChild);
        this.changed();
      }
    });
    this.fillDiffusion();
    this.fillStartRows();
  }

  private fillDiffusion() {
    const m = MODELS[this.f.model.value];
    this.f.diffusion.replaceChildren(...this.species().map((s, k) => this.fieldRow(s, m ? String(m.diffusion[s]) : k === 0 ? '1' : '40', `diffusion of ${s}`, 'diffusion')));
  }

  /** Own formulas have no closed-form rest state: the form asks a start value per species (the default formulas' rest state: u = a + b, v = b/(a + b)²). */
  private fillStartValues() {
    const own = this.f.model.value === CUSTOM;
    const old = Object.fromEntries([...this.f.startValues.querySelectorAll<HTMLInputElement>('[data-start]')].map((i) => [i.dataset.start!, i.value]));
    const defaults = ['1', '0.9'];
    this.f.startValues.replaceChildren(...(own ? this.species() : []).map((s, k) => this.fieldRow(s, old[s] ?? defaults[k] ?? '1', `the value of ${s} everywhere at t = 0 (a number or a formula in x, y, z), before noise and spots`, 'start', `start ${s}`)));
  }

  /** Start values of own formulas by species (text: a number or a formula). */
  startValuesBySpecies(): Record<string, string> {
    return Object.fromEntries([...this.f.startValues.querySelectorAll<HTMLInputElement>('[data-start]')].map((i) => [i.dataset.start!, i.value.trim()]));
  }

  /** The Start section's rows that depend on the mechanism: start values (own formulas) and spot values. */
  private fillStartRows() {
    this.fillStartValues();
    const gs = this.f.model.value === 'gray-scott';
    const defaults: Record<string, string> = gs ? { u: '0.5', v: '0.25' } : {};
    this.f.spotValues.replaceChildren(...this.species().map((s) => el('label', { class: 'row' }, el('span', { text: `spot ${s}` }), el('input', { type: 'text', 'data-species': s, value: defaults[s] ?? '', placeholder: 'unchanged' }))));
  }

  /** A row of a formula field: its label (the name, unless given), the input keyed by `data-<kind>`. */
  private fieldRow(name: string, value: string, title: string, kind: 'param' | 'diffusion' | 'start', label = name): HTMLElement {
    return el('label', { class: 'row' }, el('span', { text: label, title: label }), el('input', { type: 'text', value, title, class: 'formula', [`data-${kind}`]: name }));
  }

  /** Parse every formula as it is typed; messages name the field and the column. */
  private checkFormulas() {
    const species = this.species();
    const params = [...this.f.params.querySelectorAll<HTMLInputElement>('[data-param]')].map((i) => i.dataset.param!);
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
    for (const i of this.f.custom.querySelectorAll<HTMLInputElement>('[data-reaction]')) check(i, `d${i.dataset.reaction}/dt`, [...species, ...params, 'x', 'y', 'z', 't']);
    for (const i of this.f.params.querySelectorAll<HTMLInputElement>('[data-param]')) check(i, `parameter ${i.dataset.param}`, ['x', 'y', 'z']);
    for (const i of this.f.diffusion.querySelectorAll<HTMLInputElement>('[data-diffusion]')) check(i, `diffusion of ${i.dataset.diffusion}`, [...params, 'x', 'y', 'z']);
    for (const i of this.f.startValues.querySelectorAll<HTMLInputElement>('[data-start]')) check(i, `start value of ${i.dataset.start}`, [...params, 'x', 'y', 'z']);
    if (this.f.model.value === CUSTOM && new Set(species).size !== species.length) messages.push('species: each name once');
    // number fields: flagged where they are, never written as NaN
    for (const [input, what] of this.numberFields()) {
      input.classList.remove('invalid');
      if (input.disabled) continue;
      const parts = input === this.f.rates ? input.value.split(',') : [input.value];
      if (parts.some((t) => !Number.isFinite(Number(t.trim())) || t.trim() === '') || (input === this.f.rates && parts.length !== 3)) {
        input.classList.add('invalid');
        messages.push(`${what}: ${input === this.f.rates ? 'three numbers, e.g. 0.0002, 0, 0' : `a number, not "${input.value.trim()}"`}`);
      }
    }
    this.formulaMessages.replaceChildren(...messages.map((m) => el('p', { class: 'error', text: m })));
  }

  /** The form's number fields with the words that name them (the time step may be left empty: automatic). */
  private numberFields(): [HTMLInputElement, string][] {
    const fields: [HTMLInputElement, string][] = [[this.f.vertices, 'vertices'], [this.f.noise, 'noise'], [this.f.spots, 'spots'], [this.f.spotRadius, 'spot radius'], [this.f.end, 'end time'], [this.f.every, 'frame every'], [this.f.rate, 'growth rate'], [this.f.rates, 'growth rates']];
    if (this.f.step.value.trim() !== '') fields.push([this.f.step, 'step']);
    return fields;
  }

  /** The scenario the form describes, as YAML. */
  write(): string {
    return scenarioFromForm(this.f, { mesh: this.mesh, custom: this.f.model.value === CUSTOM, species: this.species(), spotValues: this.spotValuesBySpecies(), startValues: this.startValuesBySpecies() });
  }
}
