import { existsSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import { peekRunRecord } from './runDirectory.ts';

/** How a run paints its surface (`output.colour`, `colormap`, `range`), as its record keeps it. */
export interface RunPainting {
  colour?: string;
  colormap?: string;
  range?: [number, number] | 'frame';
}

/**
 * The painting of the run a path belongs to: a run directory, or a frame file
 * inside one (`final.ply`, `frames/…`); undefined for a file outside any run.
 * Figures and exports start from it, so they look like the run unless told otherwise.
 */
export function runPainting(path: string): RunPainting | undefined {
  if (!existsSync(path)) return undefined;
  const dirs = statSync(path).isDirectory() ? [path] : [dirname(path), dirname(dirname(path))];
  for (const dir of dirs) {
    const record = peekRunRecord(dir);
    if (!record) continue;
    const out = (record.resolved as { output?: RunPainting }).output;
    return out ? { colour: out.colour, colormap: out.colormap, range: out.range } : {};
  }
  return undefined;
}
