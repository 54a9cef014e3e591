import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { loadMeshFile, writeFileAtomic } from '../io/meshFiles.ts';
import { RUN_FILES, speciesFromProperties } from '../io/runFiles.ts';
import { COLORMAP_NAMES, type ColormapName } from '../io/colormap.ts';
import { surfaceFigurePng, surfaceFigureSvg, type FigurePanel } from '../io/surfaceFigure.ts';
import { VIEW_PRESETS } from '../io/surfaceView.ts';
import { UsageError } from './UsageError.ts';

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
  if (!existsSync(input)) throw new UsageError(`${input}: no such run directory or frame file`);
  const isRun = statSync(input).isDirectory();
  let files: { file: string; label?: string }[];
  if (isRun) {
    const recordFile = join(input, RUN_FILES.record);
    if (!existsSync(recordFile)) throw new UsageError(`${input} is not a run directory (no ${RUN_FILES.record})`);
    const record = JSON.parse(readFileSync(recordFile, 'utf8'));
    const frames: { file: string; time: number }[] = record.frames ?? [];
    const all = frames.map((f) => ({ file: join(input, f.file), label: `t = ${Number(f.time.toPrecision(5))}` }));
    if (o.sheet) files = all;
    else if (o.frame !== undefined) {
      if (o.frame >= all.length) throw new UsageError(`--frame ${o.frame}: the run has frames 0–${all.length - 1}`);
      files = [all[o.frame]];
    } else files = [{ file: existsSync(join(input, RUN_FILES.final)) ? join(input, RUN_FILES.final) : all[all.length - 1].file }];
  } else {
    if (o.sheet || o.frame !== undefined) throw new UsageError('--sheet and --frame need a run directory');
    files = [{ file: input }];
  }
  if (!files.length) throw new UsageError(`${input} has no frames`);
  const panels: FigurePanel[] = [];
  let species = o.species;
  for (const f of files) {
    const imported = loadMeshFile(f.file);
    const fields = speciesFromProperties(imported.vertexData);
    const names = Object.keys(fields);
    if (!names.length) throw new UsageError(`${f.file} holds no species: is it a frame of a run?`);
    species ??= names[names.length - 1];
    if (!fields[species]) throw new UsageError(`--species ${species}: the frames hold ${names.join(', ')}`);
    panels.push({ mesh: imported.mesh, values: fields[species], label: o.sheet ? f.label : undefined });
  }
  const colormap = o.colormap as ColormapName;
  if (!COLORMAP_NAMES.includes(colormap)) throw new UsageError(`unknown colormap "${colormap}"; choose one of ${COLORMAP_NAMES.join(', ')}`);
  let view = VIEW_PRESETS[o.view];
  if (!view) {
    const m = /^(-?[0-9.]+),(-?[0-9.]+)$/.exec(o.view);
    if (!m) throw new UsageError(`--view "${o.view}": a preset (${Object.keys(VIEW_PRESETS).join(', ')}) or azimuth,elevation in degrees`);
    view = { azimuth: Number(m[1]), elevation: Number(m[2]) };
  }
  let range: [number, number] | undefined;
  if (o.range === 'run') {
    if (!isRun) throw new UsageError('--range run takes the range over every frame of a run directory');
    let lo = Infinity, hi = -Infinity;
    const record = JSON.parse(readFileSync(join(input, RUN_FILES.record), 'utf8'));
    for (const f of record.frames as { file: string }[]) {
      for (const x of speciesFromProperties(loadMeshFile(join(input, f.file)).vertexData)[species!] ?? []) { lo = Math.min(lo, x); hi = Math.max(hi, x); }
    }
    range = hi > lo ? [lo, hi] : undefined;
  } else if (o.range !== undefined) {
    const m = /^(-?[0-9.eE+-]+):(-?[0-9.eE+-]+)$/.exec(o.range);
    if (!m || !(Number(m[2]) > Number(m[1]))) throw new UsageError(`--range "${o.range}" should be min:max with max > min, or run`);
    range = [Number(m[1]), Number(m[2])];
  }
  if (!(o.width >= 100 && o.height >= 100 && o.width <= 8000 && o.height <= 8000)) throw new UsageError('--width and --height must be from 100 to 8000 pixels');
  const spec = { panels, species: species!, colormap, range, view, title: o.title, width: o.width, height: o.height };
  const bytes = o.out.toLowerCase().endsWith('.svg') ? surfaceFigureSvg(spec) : surfaceFigurePng(spec, o.dpi);
  writeFileAtomic(o.out, bytes, o.force);
  return o.out;
}
