import { ensureDirectory } from '../io/fileAccess.ts';
import { basename, join } from 'node:path';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { colorizeField } from '../io/colormap.ts';
import { writeAnimatedGlb } from '../io/writeGlb.ts';
import { encodeSnapshot, type SnapshotFormat } from '../io/encodeSnapshot.ts';
import { runFrames, loadSnapshot, speciesRange } from '../run/runFrames.ts';
import { runPainting } from '../run/runPainting.ts';
import { colormapOption, fixedRangeOption } from '../io/paintingOptions.ts';
import { UsageError } from '../UsageError.ts';
import { ANIMATION_SECONDS, DEFAULT_COLORMAP } from '../defaults.ts';

export type ExportFormat = SnapshotFormat;

export interface ExportOptions {
  format: ExportFormat;
  out: string;
  frame?: number;
  all?: boolean;
  species?: string;
  colormap?: string;
  /** 'frame' (each file its own range), 'run' (one range over all frames of the run) or 'min:max' */
  range?: string;
  ascii?: boolean;
  /** glb: one file whose animation plays every frame of the run (growth and colours) */
  animate?: boolean;
  /** seconds of playback for the whole run (default 10) */
  duration?: number;
  force?: boolean;
}

/**
 * `placode export`: frames of a run (or one frame file) as PLY (binary or
 * ASCII; colours and every species), binary glTF (COLOR_0 in linear colour,
 * normals, species as `_NAME` attributes), OBJ with per-vertex colours, or CSV
 * of x, y, z and the species. Painted as the run painted its frames (species,
 * colormap, fixed range) unless told otherwise; colour range per file, over
 * the whole run, or fixed. Never overwrites without `force`. Returns the files written.
 */
export async function exportRun(input: string, o: ExportOptions): Promise<string[]> {
  const listed = runFrames(input);
  const isRun = listed.isRun;
  const files = [...listed.frames.map((f) => f.file), ...(listed.final ? [listed.final] : [])];
  if (!files.length) throw new UsageError(`${input} has no frames to export`);
  if (o.all && o.frame !== undefined) throw new UsageError('give --frame N or --all, not both');
  let chosen: string[];
  if (o.all) chosen = files;
  else if (o.frame !== undefined) {
    if (!isRun) throw new UsageError('--frame picks a frame of a run directory; the input is a single file');
    const frameFiles = listed.frames.map((f) => f.file);
    if (o.frame >= frameFiles.length) throw new UsageError(`--frame ${o.frame}: the run has frames 0–${frameFiles.length - 1}`);
    chosen = [frameFiles[o.frame]];
  } else chosen = [files[files.length - 1]];
  // painted as the run painted its frames unless told otherwise
  const painting = runPainting(input);
  const colormap = colormapOption(o.colormap ?? painting?.colormap ?? DEFAULT_COLORMAP);
  const snapshots = chosen.map(loadSnapshot);
  const speciesNames = Object.keys(snapshots[0].fields);
  const species = o.species ?? (painting?.colour && speciesNames.includes(painting.colour) ? painting.colour : speciesNames[speciesNames.length - 1]);
  if (!speciesNames.includes(species)) throw new UsageError(`--species ${species}: the frames hold ${speciesNames.join(', ')}`);
  let range: [number, number] | undefined;
  const rangeText = o.range ?? 'frame';
  if (o.range === undefined && Array.isArray(painting?.range) && species === painting.colour) {
    range = painting.range;
  } else if (rangeText === 'run') {
    range = speciesRange(isRun ? files : chosen, species);
  } else if (rangeText !== 'frame') {
    range = fixedRangeOption(rangeText, 'frame, run, or min:max with max > min');
  }
  if (o.animate) {
    if (o.format !== 'glb') throw new UsageError('--animate makes one animated .glb: use it with --format glb');
    if (!isRun) throw new UsageError('--animate plays the frames of a run directory');
    const all = listed.frames.map((f) => loadSnapshot(f.file));
    if (all.length < 2) throw new UsageError(`${input} has ${all.length} frame: nothing to animate`);
    const n = all[0].mesh.positions.length;
    const same = all.filter((s) => s.mesh.positions.length === n);
    if (same.length < all.length) throw new UsageError(`the surface was refined during the run (frames have ${[...new Set(all.map((s) => s.mesh.positions.length / 3))].join(', ')} vertices): one animation needs one mesh; export the frames with --all instead`);
    const times = listed.frames.map((f) => f.time ?? 0);
    const span = times[times.length - 1] - times[0] || 1;
    const duration = o.duration ?? ANIMATION_SECONDS;
    const bytes = await writeAnimatedGlb(
      all.map((s) => ({ positions: s.mesh.positions, colors: colorizeField(s.fields[species], colormap, range) })),
      all[0].mesh.triangles,
      times.slice(0, all.length).map((t) => ((t - times[0]) / span) * duration),
      basename(input),
    );
    writeFileAtomic(o.out, bytes, o.force);
    return [o.out];
  }
  const many = snapshots.length > 1;
  if (many) ensureDirectory(o.out, (m) => new UsageError(m));
  const written: string[] = [];
  for (const s of snapshots) {
    const colors = colorizeField(s.fields[species], colormap, range);
    const target = many ? join(o.out, `${s.name}.${o.format}`) : o.out;
    const bytes = await encodeSnapshot(o.format, s.mesh, s.fields, colors, `placode export of ${s.name}, colours: ${species} on ${colormap}`, o.ascii);
    writeFileAtomic(target, bytes, o.force);
    written.push(target);
  }
  return written;
}
