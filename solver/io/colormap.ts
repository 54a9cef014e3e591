import { interpolateViridis, interpolateMagma, interpolateInferno, interpolatePlasma, interpolateCividis, interpolateRdBu, interpolateGreys } from 'd3-scale-chromatic';
import { rgb } from 'd3-color';

/**
 * Colormaps from d3-scale-chromatic: perceptually uniform sequential maps
 * (viridis family, van der Walt & Smith 2015), a diverging map for signed fields
 * (blue–white–red, reversed RdBu so that positive is red) and greyscale for print.
 */
export const COLORMAPS = {
  viridis: interpolateViridis,
  magma: interpolateMagma,
  inferno: interpolateInferno,
  plasma: interpolatePlasma,
  cividis: interpolateCividis,
  diverging: (t: number) => interpolateRdBu(1 - t),
  greys: (t: number) => interpolateGreys(1 - t),
} as const;

export type ColormapName = keyof typeof COLORMAPS;
export const COLORMAP_NAMES = Object.keys(COLORMAPS) as ColormapName[];

const LUT_SIZE = 256;
const luts = new Map<ColormapName, Uint8Array>();

/** 256-entry sRGB lookup table (Uint8Array(3·256)) of a colormap. */
export function colormapTable(name: ColormapName): Uint8Array {
  let lut = luts.get(name);
  if (lut) return lut;
  const f = Object.hasOwn(COLORMAPS, name) ? COLORMAPS[name] : undefined;
  if (!f) throw new Error(`unknown colormap "${name}"; choose one of ${COLORMAP_NAMES.join(', ')}`);
  lut = new Uint8Array(3 * LUT_SIZE);
  for (let i = 0; i < LUT_SIZE; i++) {
    const c = rgb(f(i / (LUT_SIZE - 1)));
    lut[3 * i] = Math.round(c.r);
    lut[3 * i + 1] = Math.round(c.g);
    lut[3 * i + 2] = Math.round(c.b);
  }
  luts.set(name, lut);
  return lut;
}

/**
 * sRGB vertex colours (Uint8Array(3n)) of a field, mapping [min, max] onto the
 * colormap (values outside are clamped). Default range: the field's own.
 */
export function colorizeField(
  values: ArrayLike<number>,
  name: ColormapName = 'viridis',
  range?: [number, number],
  out?: Uint8Array,
): Uint8Array {
  const n = values.length;
  let [lo, hi] = range ?? [Infinity, -Infinity];
  if (!range) for (let i = 0; i < n; i++) { if (values[i] < lo) lo = values[i]; if (values[i] > hi) hi = values[i]; }
  const lut = colormapTable(name);
  const colors = out ?? new Uint8Array(3 * n);
  const scale = hi > lo ? (LUT_SIZE - 1) / (hi - lo) : 0;
  for (let i = 0; i < n; i++) {
    let k = Math.round((values[i] - lo) * scale);
    if (!(k >= 0)) k = 0;
    if (k > LUT_SIZE - 1) k = LUT_SIZE - 1;
    colors[3 * i] = lut[3 * k];
    colors[3 * i + 1] = lut[3 * k + 1];
    colors[3 * i + 2] = lut[3 * k + 2];
  }
  return colors;
}
