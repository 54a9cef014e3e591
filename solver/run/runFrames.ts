import { existsSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { loadMeshFile } from '../io/meshFiles.ts';
import { RUN_FILES, speciesFromProperties } from './runFiles.ts';
import { readRunRecord } from './runDirectory.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { UsageError } from '../UsageError.ts';

export interface FrameRef {
  file: string;
  /** simulated time, when known from the run's record */
  time?: number;
}

/** The frames of a run directory (with the final state apart), or a single frame file. */
export function runFrames(input: string): { isRun: boolean; frames: FrameRef[]; final?: string } {
  if (!existsSync(input)) throw new UsageError(`${input}: no such run directory or frame file`);
  if (!statSync(input).isDirectory()) return { isRun: false, frames: [{ file: input }] };
  const frames = readRunRecord(input).frames ?? [];
  const final = join(input, RUN_FILES.final);
  return { isRun: true, frames: frames.map((f) => ({ file: join(input, f.file), time: f.time })), final: existsSync(final) ? final : undefined };
}

export interface Snapshot {
  name: string;
  mesh: Mesh;
  fields: Record<string, Float64Array>;
}

/** A frame file's surface and species. */
export function loadSnapshot(file: string): Snapshot {
  const imported = loadMeshFile(file);
  const fields = speciesFromProperties(imported.vertexData);
  if (!Object.keys(fields).length) throw new UsageError(`${file} holds no species (float vertex properties named species_<name>): is it a frame of a run?`);
  return { name: basename(file).replace(/\.ply$/, ''), mesh: imported.mesh, fields };
}

/** One species of a frame file (default: its last), with the name chosen; a species it lacks is a usage error. */
export function snapshotField(file: string, species?: string): { mesh: Mesh; values: Float64Array; species: string } {
  const snap = loadSnapshot(file);
  const names = Object.keys(snap.fields);
  const chosen = species ?? names[names.length - 1];
  if (!snap.fields[chosen]) throw new UsageError(`--species ${chosen}: ${file} holds ${names.join(', ')}`);
  return { mesh: snap.mesh, values: snap.fields[chosen], species: chosen };
}

/** Smallest and largest value of a species over frame files (a colour range shared by a whole run). */
export function speciesRange(files: readonly string[], species: string): [number, number] | undefined {
  let lo = Infinity, hi = -Infinity;
  for (const f of files) for (const x of loadSnapshot(f).fields[species] ?? []) { lo = Math.min(lo, x); hi = Math.max(hi, x); }
  return hi > lo ? [lo, hi] : undefined;
}
