import { existsSync, mkdirSync, readFileSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { loadMeshFile, writeFileAtomic } from '../io/meshFiles.ts';
import { RUN_FILES, speciesFromProperties } from '../io/runFiles.ts';
import { colorizeField, COLORMAP_NAMES, type ColormapName } from '../io/colormap.ts';
import { writeAnimatedGlb } from '../io/writeGlb.ts';
import { encodeSnapshot, type SnapshotFormat } from '../io/encodeSnapshot.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { UsageError } from './UsageError.ts';

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

interface Snapshot {
  name: string;
  mesh: Mesh;
  fields: Record<string, Float64Array>;
}

/** The frames of a run directory (or a single frame file), as files in order. */
function framesOf(input: string): { files: string[]; isRun: boolean } {
  if (!existsSync(input)) throw new UsageError(`${input}: no such run directory or frame file`);
  if (statSync(input).isDirectory()) {
    const record = join(input, RUN_FILES.record);
    if (!existsSync(record)) throw new UsageError(`${input} is not a run directory (no ${RUN_FILES.record})`);
    const frames: { file: string }[] = JSON.parse(readFileSync(record, 'utf8')).frames ?? [];
    const files = frames.map((f) => join(input, f.file));
    if (existsSync(join(input, RUN_FILES.final))) files.push(join(input, RUN_FILES.final));
    return { files, isRun: true };
  }
  return { files: [input], isRun: false };
}

function load(file: string): Snapshot {
  const imported = loadMeshFile(file);
  const fields = speciesFromProperties(imported.vertexData);
  if (!Object.keys(fields).length) throw new UsageError(`${file} holds no species (float vertex properties named species_<name>): is it a frame of a run?`);
  return { name: basename(file).replace(/\.ply$/, ''), mesh: imported.mesh, fields };
}

/**
 * `placode export`: frames of a run (or one frame file) as PLY (binary or
 * ASCII; colours and every species), binary glTF (COLOR_0 in linear colour,
 * normals, species as `_NAME` attributes), OBJ with per-vertex colours, or CSV
 * of x, y, z and the species. Colour range per file, over the whole run, or
 * fixed. Never overwrites without `force`. Returns the files written.
 */
export async function exportRun(input: string, o: ExportOptions): Promise<string[]> {
  const { files, isRun } = framesOf(input);
  if (!files.length) throw new UsageError(`${input} has no frames to export`);
  if (o.all && o.frame !== undefined) throw new UsageError('give --frame N or --all, not both');
  let chosen: string[];
  if (o.all) chosen = files;
  else if (o.frame !== undefined) {
    if (!isRun) throw new UsageError('--frame picks a frame of a run directory; the input is a single file');
    const frameFiles = files.filter((f) => !f.endsWith(RUN_FILES.final));
    if (o.frame >= frameFiles.length) throw new UsageError(`--frame ${o.frame}: the run has frames 0–${frameFiles.length - 1}`);
    chosen = [frameFiles[o.frame]];
  } else chosen = [files[files.length - 1]];
  const colormap = (o.colormap ?? 'viridis') as ColormapName;
  if (!COLORMAP_NAMES.includes(colormap)) throw new UsageError(`unknown colormap "${colormap}"; choose one of ${COLORMAP_NAMES.join(', ')}`);
  const snapshots = chosen.map(load);
  const speciesNames = Object.keys(snapshots[0].fields);
  const species = o.species ?? speciesNames[speciesNames.length - 1];
  if (!speciesNames.includes(species)) throw new UsageError(`--species ${species}: the frames hold ${speciesNames.join(', ')}`);
  let range: [number, number] | undefined;
  const rangeText = o.range ?? 'frame';
  if (rangeText === 'run') {
    let lo = Infinity, hi = -Infinity;
    for (const f of isRun ? files : chosen) {
      const v = (f === chosen[0] ? snapshots[0] : load(f)).fields[species];
      for (const x of v) { lo = Math.min(lo, x); hi = Math.max(hi, x); }
    }
    range = [lo, hi];
  } else if (rangeText !== 'frame') {
    const m = /^(-?[0-9.eE+-]+):(-?[0-9.eE+-]+)$/.exec(rangeText);
    if (!m || !(Number(m[2]) > Number(m[1]))) throw new UsageError(`--range "${rangeText}" should be frame, run, or min:max with max > min`);
    range = [Number(m[1]), Number(m[2])];
  }
  if (o.animate) {
    if (o.format !== 'glb') throw new UsageError('--animate makes one animated .glb: use it with --format glb');
    if (!isRun) throw new UsageError('--animate plays the frames of a run directory');
    const all = files.filter((f) => !f.endsWith(RUN_FILES.final)).map(load);
    if (all.length < 2) throw new UsageError(`${input} has ${all.length} frame: nothing to animate`);
    const n = all[0].mesh.positions.length;
    const same = all.filter((s) => s.mesh.positions.length === n);
    if (same.length < all.length) throw new UsageError(`the surface was refined during the run (frames have ${[...new Set(all.map((s) => s.mesh.positions.length / 3))].join(', ')} vertices): one animation needs one mesh; export the frames with --all instead`);
    const record = JSON.parse(readFileSync(join(input, RUN_FILES.record), 'utf8'));
    const times: number[] = record.frames.map((f: { time: number }) => f.time);
    const span = times[times.length - 1] - times[0] || 1;
    const duration = o.duration ?? 10;
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
  if (many) mkdirSync(o.out, { recursive: true });
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
