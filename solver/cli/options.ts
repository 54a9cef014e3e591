import type { Command } from 'commander';
import { UsageError } from '../UsageError.ts';
import { DEFAULT_SHAPE_VERTICES } from '../defaults.ts';

/** Commander's collector of a repeatable option. */
export const collect = (value: string, previous: string[] = []) => previous.concat([value]);

/** A whole number ≥ min from the command line (undefined when the option was not given). */
export function parseCount(text: string | undefined, what: string, min = 0, max = Number.MAX_SAFE_INTEGER): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!Number.isInteger(v) || v < min || v > max) throw new UsageError(`${what} must be a whole number ${max < Number.MAX_SAFE_INTEGER ? `from ${min} to ${max}` : `≥ ${min}`}, got "${text}"`);
  return v;
}

/** `key=value` pairs of shape parameters. */
export function parseParams(pairs: string[] = []): Record<string, number> {
  const out: Record<string, number> = {};
  for (const pair of pairs) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)=(.+)$/.exec(pair);
    if (!m) throw new UsageError(`shape parameter "${pair}" should read name=value, e.g. -p radius=2`);
    const v = Number(m[2]);
    if (!Number.isFinite(v)) throw new UsageError(`shape parameter ${m[1]} must be a number, got "${m[2]}"`);
    out[m[1]] = v;
  }
  return out;
}

/** The options of every command that builds or loads a mesh (see meshSource.ts). */
export function addMeshOptions(cmd: Command): Command {
  return cmd
    .option('-p, --param <name=value>', 'shape parameter (repeat for several); see `placode shapes`', collect)
    .option('--vertices <n>', `target vertex count of a built-in shape (default ${DEFAULT_SHAPE_VERTICES})`)
    .option('--weld [tolerance]', 'merge vertices closer than tolerance (default: identical ones)')
    .option('--fix-orientation', 'make triangle orientation consistent (outward on closed surfaces)')
    .option('--drop-unreferenced', 'remove vertices no triangle uses')
    .option('--refine <n>', '1-to-4 midpoint refinements to apply')
    .option('--loop <n>', 'Loop subdivision steps to apply (smooths the surface)')
    .option('--reorder', 'renumber the vertices so neighbours are close in memory (reverse Cuthill–McKee; faster stepping on a scattered mesh)')
    .option('--remesh [vertices]', 'isotropic remeshing (Botsch–Kobbelt), to about this many vertices (default: the mean edge kept; --edge sets a length)')
    .option('--edge <length>', 'with --remesh: the target edge length')
    .option('--crease <degrees>', 'with --remesh: keep edges where the surface folds by more than this (default: none; a scan\'s terraces are not creases)')
    .option('--fill-holes <maxEdges>', 'close boundary loops of at most this many edges')
    .option('--smooth <steps>', 'Taubin λ|μ smoothing steps (removes terraces without shrinking)')
    .option('--scale <factor>', 'multiply the coordinates by this as the mesh is read (0.001 turns µm into mm)')
    .option('--units <unit>', 'the length unit of the (scaled) coordinates, shown with lengths and areas (µm, mm, …)');
}

export type ProgressChoice = 'auto' | 'bar' | 'lines' | 'none';
export const PROGRESS_CHOICES: ProgressChoice[] = ['auto', 'bar', 'lines', 'none'];

/** A number for the terminal: `precision` significant digits, exponent form (5 digits) when very large or small. */
export function formatNumber(x: number, precision = 6): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  return Math.abs(x) >= 1e4 || Math.abs(x) < 1e-3 ? x.toExponential(4) : x.toPrecision(precision);
}
