/**
 * What is painted on a frame, as on screen: the field or an eigenmode, its label,
 * colormap and colour range — the one rule the surface, the colour bar and every
 * export follow.
 */
import type { ColormapName } from '../../solver/io/colormap.ts';

/** Below this spread (max − min over the largest |value|) a field is shown with that much colour range at least, and its spread is stated. */
export const TINY_CONTRAST = 0.01;

export interface Painting {
  values: Float64Array;
  label: string;
  colormap: ColormapName;
  range: [number, number];
  /** the field's own min and max */
  own: [number, number];
  showMode: boolean;
  /** spread over size (fields, not modes) */
  relative?: number;
}

export interface PaintingChoice {
  /** an eigenmode to paint instead of the field */
  mode?: { index: number; values: Float64Array };
  species: string;
  colormap: ColormapName;
  range: 'frame' | 'run' | 'fixed';
  fixed: [number, number];
  /** the range of the frames shown so far (range "run") */
  runRange?: [number, number];
}

export function fieldRange(values: Float64Array): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < values.length; i++) { const v = values[i]; if (v < lo) lo = v; if (v > hi) hi = v; }
  return [lo, hi];
}

export function paintingOf(fields: Record<string, Float64Array>, c: PaintingChoice): Painting | undefined {
  const showMode = c.mode !== undefined;
  const label = showMode ? `mode ${c.mode!.index}` : c.species;
  const values = showMode ? c.mode!.values : fields[label];
  if (!values) return undefined;
  const own = fieldRange(values);
  if (showMode) {
    const m = Math.max(Math.abs(own[0]), Math.abs(own[1]));
    return { values, label, colormap: 'diverging', range: [-m, m], own, showMode };
  }
  let range: [number, number] =
    c.range === 'fixed' ? c.fixed
    : c.range === 'run' && c.runRange ? [Math.min(c.runRange[0], own[0]), Math.max(c.runRange[1], own[1])]
    : own;
  // a field that hardly varies (noise around the rest state) is not stretched over the whole map:
  // "each frame" spans at least TINY_CONTRAST of the field's size, and the caption says how small it is
  const size = Math.max(Math.abs(own[0]), Math.abs(own[1]));
  const relative = size > 0 ? (own[1] - own[0]) / size : 0;
  if (c.range === 'frame' && size > 0 && relative < TINY_CONTRAST) {
    const mid = (own[0] + own[1]) / 2;
    range = [mid - (TINY_CONTRAST * size) / 2, mid + (TINY_CONTRAST * size) / 2];
  }
  if (!(range[1] > range[0])) range = [range[0] - 0.5, range[0] + 0.5];
  return { values, label, colormap: c.colormap, range, own, showMode, relative };
}
