import type { Mesh } from '../mesh/Mesh.ts';
import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { thresholdComponents, type PatchSummary, type VertexNeighbours } from './thresholdComponents.ts';
import { otsuThreshold } from './otsuThreshold.ts';
import { modeSpectrum, type ModeSpectrum } from './modeSpectrum.ts';

export type ThresholdRule = 'otsu' | 'mid-range' | number;

export interface PatternMeasure {
  threshold: number;
  patches: PatchSummary[];
  /** patch index per vertex (−1: background), for tracking events between frames */
  labels: Int32Array;
  /** dominant cluster of the field's projection on the surface modes (when eigenpairs are given) */
  dominant: ModeSpectrum['dominant'];
}

/**
 * Measure a pattern: cut the field at the threshold the rule gives (Otsu's
 * area-weighted rule, the mid-range (min + max)/2, or a fixed value), count
 * the connected patches above it with their areas and centroids, and find the
 * dominant surface-mode cluster of the field.
 */
export function measurePattern(mesh: Mesh, field: ArrayLike<number>, mass: Float64Array, neighbours: VertexNeighbours, rule: ThresholdRule, eig?: Eigenpairs): PatternMeasure {
  let threshold: number | undefined;
  if (rule === 'otsu') threshold = otsuThreshold(field, mass);
  else if (typeof rule === 'number') threshold = rule;
  const c = thresholdComponents(mesh, field, threshold, mass, neighbours);
  // a flat field has no pattern: nothing stands above its own level
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < field.length; i++) { lo = Math.min(lo, field[i]); hi = Math.max(hi, field[i]); }
  const flat = !(hi - lo > 1e-9 * Math.max(1, Math.abs(hi)));
  return {
    threshold: c.threshold,
    patches: flat && typeof rule !== 'number' ? [] : c.patches,
    labels: flat && typeof rule !== 'number' ? new Int32Array(field.length).fill(-1) : c.label,
    dominant: eig ? modeSpectrum(field, mass, eig).dominant : null,
  };
}
