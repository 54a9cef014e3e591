import type { ColormapName } from './colormap.ts';
import { VIEW_PRESETS } from './surfaceView.ts';
import { COLORMAP_CHOICES } from '../defaults.ts';
import { UsageError } from '../UsageError.ts';

/**
 * How a figure or an export is painted, given as text (command-line options,
 * a sweep's collect options): checked here, each refusal saying what is
 * accepted.
 */

/** A colormap by name, or a usage error listing them. */
export function colormapOption(name: string): ColormapName {
  if (!(COLORMAP_CHOICES as readonly string[]).includes(name)) throw new UsageError(`unknown colormap "${name}"; choose one of ${COLORMAP_CHOICES.join(', ')}`);
  return name as ColormapName;
}

/** `min:max` (max > min), or a usage error saying what `--range` accepts. */
export function fixedRangeOption(text: string, accepted: string): [number, number] {
  const m = /^(-?[0-9.eE+-]+):(-?[0-9.eE+-]+)$/.exec(text);
  if (!m || !(Number(m[2]) > Number(m[1]))) throw new UsageError(`--range "${text}" should be ${accepted}`);
  return [Number(m[1]), Number(m[2])];
}

/** A view preset (front, iso, …) or `azimuth,elevation` in degrees; `presetsOnly` refuses the angles. */
export function viewOption(text: string, presetsOnly = false): { azimuth: number; elevation: number } {
  const preset = Object.hasOwn(VIEW_PRESETS, text) ? VIEW_PRESETS[text] : undefined;
  if (preset) return preset;
  const m = presetsOnly ? null : /^(-?[0-9.]+),(-?[0-9.]+)$/.exec(text);
  if (!m) throw new UsageError(presetsOnly ? `--view "${text}": one of ${Object.keys(VIEW_PRESETS).join(', ')}` : `--view "${text}": a preset (${Object.keys(VIEW_PRESETS).join(', ')}) or azimuth,elevation in degrees`);
  return { azimuth: Number(m[1]), elevation: Number(m[2]) };
}
