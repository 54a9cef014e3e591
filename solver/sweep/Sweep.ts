import { parse } from 'yaml';

/**
 * A parameter sweep, as written by the user: a base scenario and the values
 * to vary. Either a sweep file (`scenario:` names the base) or a `sweep:`
 * section inside a scenario (the rest of the scenario is the base).
 */
export interface SweepSpec {
  /** sweep files: the base scenario, relative to the sweep file */
  scenario?: string;
  name?: string;
  description?: string;
  /** every combination (default), independent random samples, or a Latin hypercube */
  design?: 'grid' | 'random' | 'latin-hypercube';
  /** random and latin-hypercube: how many points */
  samples?: number;
  /** seed of the random designs (default 1) */
  seed?: number;
  /** dotted scenario path (`kinetics.parameters.F`, `growth.rates.0`) → the values it takes */
  vary: Record<string, SweepAxis>;
}

/** A list of values, or a numeric range. */
export type SweepAxis = unknown[] | SweepRange;

export interface SweepRange {
  from: number;
  to: number;
  /** grid: number of values from `from` to `to` inclusive (random designs ignore it) */
  steps?: number;
  /** evenly spaced values (linear, default) or evenly spaced logarithms (log) */
  scale?: 'linear' | 'log';
  /** round every value to an integer (vertex counts, spot counts) */
  integer?: boolean;
}

const rangeSchema = {
  type: 'object',
  additionalProperties: false,
  required: ['from', 'to'],
  properties: {
    from: { type: 'number' },
    to: { type: 'number' },
    steps: { type: 'integer', minimum: 1, maximum: 100000 },
    scale: { enum: ['linear', 'log'] },
    integer: { type: 'boolean' },
  },
};

/** The fields of a sweep shared by sweep files and a scenario's `sweep` section. */
const sweepProperties = {
  name: { type: 'string' },
  description: { type: 'string' },
  design: { enum: ['grid', 'random', 'latin-hypercube'] },
  samples: { type: 'integer', minimum: 1, maximum: 1000000 },
  seed: { type: 'integer', minimum: 0, maximum: 4294967295 },
  vary: {
    type: 'object',
    minProperties: 1,
    propertyNames: { pattern: '^[A-Za-z0-9_]+(\\.[A-Za-z0-9_]+)*$' },
    additionalProperties: {
      description: 'a list of values or a range {from, to, steps, scale}',
      oneOf: [{ type: 'array', minItems: 1 }, rangeSchema],
    },
  },
};

/** JSON Schema of a scenario's `sweep` section. */
export const SWEEP_SECTION_SCHEMA = { type: 'object', additionalProperties: false, required: ['vary'], properties: sweepProperties };

/** JSON Schema of a sweep file. */
export const SWEEP_FILE_SCHEMA = {
  type: 'object',
  additionalProperties: false,
  required: ['scenario', 'vary'],
  properties: { scenario: { type: 'string', minLength: 1 }, ...sweepProperties },
};

/**
 * Whether a file's text is a sweep file (a base `scenario` to vary) rather
 * than a scenario; text that is not YAML is neither (its parser says why).
 */
export function isSweepFileText(text: string): boolean {
  let data: unknown;
  try {
    data = parse(text);
  } catch {
    return false;
  }
  return data !== null && typeof data === 'object' && 'scenario' in data && !('kinetics' in data);
}
