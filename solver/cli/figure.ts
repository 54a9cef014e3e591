import { writeFileAtomic } from '../io/meshFiles.ts';
import { runFrames, snapshotField, speciesRange } from '../run/runFrames.ts';
import { colormapOption, fixedRangeOption, viewOption } from '../io/paintingOptions.ts';
import { surfaceFigurePng, surfaceFigureSvg, type FigurePanel } from '../io/surfaceFigure.ts';
import { UsageError } from '../UsageError.ts';

export interface FigureOptions {
  out: string;
  frame?: number;
  sheet?: boolean;
  species?: string;
  colormap: string;
  range?: string;
  view: string;
  title?: string;
  width: number;
  height: number;
  dpi: number;
  force?: boolean;
}

/**
 * `placode figure`: the coloured surface of a frame (or, with --sheet, every
 * frame of a run in a grid with time captions) as SVG (vector) or PNG.
 */
export function runFigure(input: string, o: FigureOptions): string {
  if (!/\.(png|svg)$/i.test(o.out)) throw new UsageError(`--out ${o.out}: write .png or .svg`);
  const listed = runFrames(input);
  const isRun = listed.isRun;
  let files: { file: string; label?: string }[];
  if (isRun) {
    const all = listed.frames.map((f) => ({ file: f.file, label: `t = ${Number((f.time ?? 0).toPrecision(5))}` }));
    if (o.sheet) files = all;
    else if (o.frame !== undefined) {
      if (o.frame >= all.length) throw new UsageError(`--frame ${o.frame}: the run has frames 0–${all.length - 1}`);
      files = [all[o.frame]];
    } else files = [{ file: listed.final ?? all[all.length - 1].file }];
  } else {
    if (o.sheet || o.frame !== undefined) throw new UsageError('--sheet and --frame need a run directory');
    files = [{ file: input }];
  }
  if (!files.length) throw new UsageError(`${input} has no frames`);
  const panels: FigurePanel[] = [];
  let species = o.species;
  for (const f of files) {
    const field = snapshotField(f.file, species);
    species = field.species;
    panels.push({ mesh: field.mesh, values: field.values, label: o.sheet ? f.label : undefined });
  }
  const colormap = colormapOption(o.colormap);
  const view = viewOption(o.view);
  let range: [number, number] | undefined;
  if (o.range === 'run') {
    if (!isRun) throw new UsageError('--range run takes the range over every frame of a run directory');
    range = speciesRange(listed.frames.map((f) => f.file), species!);
  } else if (o.range !== undefined) {
    range = fixedRangeOption(o.range, 'min:max with max > min, or run');
  }
  if (!(o.width >= 100 && o.height >= 100 && o.width <= 8000 && o.height <= 8000)) throw new UsageError('--width and --height must be from 100 to 8000 pixels');
  const spec = { panels, species: species!, colormap, range, view, title: o.title, width: o.width, height: o.height };
  const bytes = o.out.toLowerCase().endsWith('.svg') ? surfaceFigureSvg(spec) : surfaceFigurePng(spec, o.dpi);
  writeFileAtomic(o.out, bytes, o.force);
  return o.out;
}
