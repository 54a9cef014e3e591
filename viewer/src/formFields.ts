/** The scenario form's fields: one element per setting, made once, read and written by scenarioFromForm and ScenarioForm. */
import { el } from './dom.ts';

export function createFormFields() {
  return {
    source: el('select', { id: 'tissue-source', 'aria-label': 'tissue source' }),
    shape: el('select', { id: 'tissue-shape', 'aria-label': 'shape' }),
    shapeParams: el('div', { class: 'fields', id: 'shape-params' }),
    vertices: el('input', { id: 'tissue-vertices', type: 'number', min: 50, step: 100, value: 6000 }),
    model: el('select', { id: 'mechanism-model', 'aria-label': 'kinetics' }),
    speciesInput: el('input', { id: 'mechanism-species', type: 'text', value: 'u, v' }),
    custom: el('div', { class: 'fields', id: 'own-formulas' }),
    params: el('div', { class: 'fields', id: 'mechanism-params' }),
    diffusion: el('div', { class: 'fields', id: 'mechanism-diffusion' }),
    law: el('select', { id: 'growth-law', 'aria-label': 'growth law' }),
    rate: el('input', { id: 'growth-rate', type: 'text', value: '0.0001' }),
    rates: el('input', { id: 'growth-rates', type: 'text', value: '0.0002, 0, 0', title: 'relative growth rates along x, y, z' }),
    refine: el('input', { id: 'growth-refine', type: 'checkbox', checked: true }),
    seed: el('input', { id: 'start-seed', type: 'number', value: 7, min: 0 }),
    noise: el('input', { id: 'start-noise', type: 'text', value: '0.01' }),
    spots: el('input', { id: 'start-spots', type: 'number', value: 6, min: 0 }),
    spotRadius: el('input', { id: 'start-spot-radius', type: 'text', value: '0.03' }),
    spotValues: el('div', { class: 'fields', id: 'start-spot-values' }),
    startValues: el('div', { class: 'fields', id: 'start-values' }),
    scheme: el('select', { id: 'clock-scheme', 'aria-label': 'scheme' }),
    step: el('input', { id: 'clock-step', type: 'text', value: '1', placeholder: 'auto' }),
    end: el('input', { id: 'clock-end', type: 'text', value: '8000' }),
    every: el('input', { id: 'clock-every', type: 'text', value: '200' }),
  };
}

/** The refinement the form's growth asks for: split triangles once their edges have grown this much. */
export const FORM_EDGE_GROWTH = 1.6;

export type FormFields = ReturnType<typeof createFormFields>;

/** A labelled row: the label, the control and an optional hint under it. */
export const row = (label: string, input: HTMLElement, hint?: string) => el('label', { class: 'row' }, el('span', { text: label }), input, hint ? el('small', { text: hint }) : null);

/** A collapsible section of the form, open at first. */
export const section = (title: string, ...rows: Node[]) => el('details', { open: true, class: 'section' }, el('summary', { text: title }), ...rows);
