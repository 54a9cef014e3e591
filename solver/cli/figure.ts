import { writeFileAtomic, loadMeshFile } from '../io/meshFiles.ts';
import { runFrames, speciesRange } from '../run/runFrames.ts';
import { speciesFromProperties } from '../run/runFiles.ts';
import { runPainting } from '../run/runPainting.ts';
import { colormapOption, fixedRangeOption, viewOption } from '../io/paintingOptions.ts';
import { surfaceFigureSvg, type FigurePanel } from '../io/surfaceFigure.ts';
import { surfaceFigurePng } from '../io/surfaceFigurePng.ts';
import { SHADINGS, type Shading } from '../io/surfaceRaster.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { UsageError } from '../UsageError.ts';
import { DEFAULT_COLORMAP } from '../defaults.ts';

export interface FigureOptions {
  out: string;
  frame?: number;
  sheet?: boolean;
  /** a species of a run's frames (default: the run's painted one, else the last) */
  species?: string;
  /** any scalar vertex property of the PLY (`mode`, `species_u`, one of your own) */
  field?: string;
  /** default: the run's colormap; `diverging` for a mode; else viridis */
  colormap?: string;
  /** min:max or run; default: the run's fixed range, symmetric for a mode, else over the frames shown */
  range?: string;
  view: string;
  title?: string;
  width: number;
  height: number;
  dpi: number;
  shading?: string;
  /** SVG: the surface as triangles rather than an embedded image */
  vector?: boolean;
  force?: boolean;
}

/** A field picked from a PLY file, with the name the colour bar shows and a caption for modes. */
interface PickedField {
  mesh: Mesh;
  values: Float64Array;
  name: string;
  /** an eigenmode's eigenvalue, from the file's header comment */
  eigenvalue?: number;
}

/** The eigenvalue a painted mode's header carries ("eigenvalue 12.3", "predicted pattern: eigenvalue 12.3, …"). */
function eigenvalueOf(comments: readonly string[] | undefined): number | undefined {
  for (const c of comments ?? []) {
    const m = /\beigenvalue\s+(-?[0-9.]+(?:e[+-]?\d+)?)/i.exec(c);
    if (m) return Number(m[1]);
  }
  return undefined;
}

/**
 * The field to paint from a PLY: `--field` (any scalar vertex property), else
 * `--species`, else the run's painted species, else the last species; a file
 * with no species paints its `mode` or its only scalar property.
 */
function pickField(file: string, o: { species?: string; field?: string }, painted?: string): PickedField {
  const imported = loadMeshFile(file);
  const data = imported.vertexData;
  const scalars = Object.keys(data);
  const eigenvalue = eigenvalueOf(imported.comments);
  if (o.field !== undefined) {
    if (!data[o.field]) throw new UsageError(`--field ${o.field}: ${file} has ${scalars.length ? `the scalar vertex properties ${scalars.join(', ')}` : 'no scalar vertex properties beyond position, normal and colour'}`);
    return { mesh: imported.mesh, values: data[o.field], name: o.field.replace(/^species_/, ''), eigenvalue: o.field === 'mode' ? eigenvalue : undefined };
  }
  const species = speciesFromProperties(data);
  const names = Object.keys(species);
  if (o.species !== undefined) {
    if (!species[o.species]) throw new UsageError(`--species ${o.species}: ${file} holds ${names.length ? `the species ${names.join(', ')}` : `no species (its scalar vertex properties: ${scalars.join(', ') || 'none'}); paint one with --field NAME`}`);
    return { mesh: imported.mesh, values: species[o.species], name: o.species };
  }
  if (names.length) {
    const name = painted && species[painted] ? painted : names[names.length - 1];
    return { mesh: imported.mesh, values: species[name], name };
  }
  if (data.mode) return { mesh: imported.mesh, values: data.mode, name: 'mode', eigenvalue };
  if (scalars.length === 1) return { mesh: imported.mesh, values: data[scalars[0]], name: scalars[0] };
  throw new UsageError(`${file} ${scalars.length ? `has several scalar vertex properties (${scalars.join(', ')}): choose one with --field NAME` : 'has no values to paint: no species, no mode, no scalar vertex property'}`);
}

/** Shortest round form of an eigenvalue for a caption. */
const short = (x: number) => String(Number(x.toPrecision(5)));

/**
 * `placode figure`: the coloured surface of a frame (or, with --sheet, every
 * frame of a run in a grid with time captions), or any scalar field of a PLY
 * (a painted mode is captioned with its eigenvalue), as SVG or PNG with real
 * type. It paints as the run did (species, colormap, range) unless told otherwise.
 */
export function runFigure(input: string, o: FigureOptions): string {
  if (!/\.(png|svg)$/i.test(o.out)) throw new UsageError(`--out ${o.out}: write .png or .svg`);
  const shading = (o.shading ?? 'soft') as Shading;
  if (!SHADINGS.includes(shading)) throw new UsageError(`--shading ${o.shading}: choose ${SHADINGS.join(', ')}`);
  const svg = o.out.toLowerCase().endsWith('.svg');
  if (o.vector && !svg) throw new UsageError('--vector draws the surface as SVG triangles: use it with an .svg output');
  if (o.field !== undefined && o.species !== undefined) throw new UsageError('give --species or --field, not both');
  const listed = runFrames(input);
  const isRun = listed.isRun;
  const painting = runPainting(input);
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
  let name: string | undefined;
  let mode = false;
  for (const f of files) {
    const picked = pickField(f.file, { species: o.species ?? name, field: o.field }, painting?.colour);
    name = picked.name;
    mode = picked.name === 'mode';
    const caption = picked.eigenvalue !== undefined ? `mode, λ = ${short(picked.eigenvalue)}` : undefined;
    panels.push({ mesh: picked.mesh, values: picked.values, label: o.sheet ? f.label : caption });
  }
  const colormap = colormapOption(o.colormap ?? (mode ? 'diverging' : painting?.colormap ?? DEFAULT_COLORMAP));
  const view = viewOption(o.view);
  let range: [number, number] | undefined;
  if (o.range === 'run') {
    if (!isRun) throw new UsageError('--range run takes the range over every frame of a run directory');
    if (o.field !== undefined) throw new UsageError('--range run spans a species over the run: use it with --species');
    range = speciesRange(listed.frames.map((f) => f.file), name!);
  } else if (o.range !== undefined) {
    range = fixedRangeOption(o.range, 'min:max with max > min, or run');
  } else if (mode) {
    let amax = 0;
    for (const p of panels) for (let i = 0; i < p.values!.length; i++) amax = Math.max(amax, Math.abs(p.values![i]));
    range = [-(amax || 1), amax || 1]; // white at zero
  } else if (Array.isArray(painting?.range) && o.field === undefined && (o.species === undefined || o.species === painting.colour)) {
    range = painting.range;
  }
  if (!(o.width >= 100 && o.height >= 100 && o.width <= 8000 && o.height <= 8000)) throw new UsageError('--width and --height must be from 100 to 8000 pixels');
  if (!(o.dpi >= 36 && o.dpi <= 2400)) throw new UsageError('--dpi must be from 36 to 2400');
  const spec = { panels, species: name!, colormap, range, view, title: o.title, width: o.width, height: o.height, dpi: o.dpi, shading, surface: o.vector ? 'vector' as const : 'image' as const };
  const bytes = svg ? surfaceFigureSvg(spec) : surfaceFigurePng(spec);
  writeFileAtomic(o.out, bytes, o.force);
  return o.out;
}
