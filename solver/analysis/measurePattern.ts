import type { Mesh } from '../mesh/Mesh.ts';
import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { thresholdComponents, type PatchSummary, type VertexNeighbours } from './thresholdComponents.ts';
import { otsuThreshold } from './otsuThreshold.ts';
import { modeSpectrum, type ModeSpectrum } from './modeSpectrum.ts';

export type ThresholdRule = 'otsu' | 'mid-range' | number;

/**
 * The contrast (max − min) a field needs to count as a pattern: max(absolute, relative × max(|min|, |max|)).
 * Below it the field is noise or round-off around a uniform state: no patches.
 */
export interface ContrastFloor {
  absolute: number;
  relative: number;
  /**
   * the field's rest level per vertex (a steady state that varies over the surface): the contrast is
   * then that of the departure from it, since a gradient of the rest state is not a pattern
   */
  rest?: Float64Array;
}

/** Only a field that is exactly flat (to 1e-9 of its magnitude) is no pattern. */
export const FLAT_ONLY: ContrastFloor = { absolute: 0, relative: 1e-9 };

export interface PatternMeasure {
  threshold: number;
  patches: PatchSummary[];
  /** patch index per vertex (−1: background), for tracking events between frames */
  labels: Int32Array;
  /** dominant cluster of the field's projection on the surface modes (when eigenpairs are given) */
  dominant: ModeSpectrum['dominant'];
  /** max − min of the field, and the floor it had to exceed to count as a pattern */
  contrast: number;
  floor: number;
}

/**
 * Measure a pattern: cut the field at the threshold the rule gives (Otsu's
 * area-weighted rule, the mid-range (min + max)/2, or a fixed value), count
 * the connected patches above it with their areas and centroids, and find the
 * dominant surface-mode cluster of the field. A field whose contrast does not
 * exceed the floor has no patches: noise, or round-off around a uniform state,
 * is not a pattern (nor the gradient of a steady state that varies over the
 * surface: with `floor.rest` the contrast is that of the departure from it).
 */
export function measurePattern(mesh: Mesh, field: ArrayLike<number>, mass: Float64Array, neighbours: VertexNeighbours, rule: ThresholdRule, eig?: Eigenpairs, floor: ContrastFloor = FLAT_ONLY): PatternMeasure {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < field.length; i++) { lo = Math.min(lo, field[i]); hi = Math.max(hi, field[i]); }
  let contrast = hi - lo;
  const rest = floor.rest && floor.rest.length === field.length ? floor.rest : undefined;
  if (rest) {
    let dlo = Infinity, dhi = -Infinity;
    for (let i = 0; i < field.length; i++) { const d = field[i] - rest[i]; dlo = Math.min(dlo, d); dhi = Math.max(dhi, d); }
    contrast = dhi - dlo;
  }
  const needed = Math.max(floor.absolute, floor.relative * Math.max(Math.abs(lo), Math.abs(hi)));
  const dominant = eig ? modeSpectrum(field, mass, eig).dominant : null;
  const midRange = 0.5 * (lo + hi);
  if (!(contrast > needed)) {
    return { threshold: typeof rule === 'number' ? rule : midRange, patches: [], labels: new Int32Array(field.length).fill(-1), dominant, contrast, floor: needed };
  }
  // (the mid-range from the extremes already found, not a second pass)
  const threshold = rule === 'otsu' ? otsuThreshold(field, mass) : typeof rule === 'number' ? rule : midRange;
  const c = thresholdComponents(mesh, field, threshold, mass, neighbours);
  return { threshold: c.threshold, patches: c.patches, labels: c.label, dominant, contrast, floor: needed };
}
