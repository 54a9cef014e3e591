import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { RUN_FILES, decodeState } from './runFiles.ts';
import type { RunRecord } from './RunRecord.ts';
import { loadSnapshot } from './runFrames.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { UsageError } from '../UsageError.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';

/**
 * A run directory's record.json: undefined when there is none, null when it
 * cannot be read (a run killed before its first write, or a damaged file).
 */
export function peekRunRecord(dir: string): RunRecord | null | undefined {
  const file = join(dir, RUN_FILES.record);
  if (!existsSync(file)) return undefined;
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as RunRecord;
  } catch {
    return null;
  }
}

/** A run directory's record.json; a usage error naming the file when the directory is not a run or the record is unreadable. */
export function readRunRecord(dir: string): RunRecord {
  const file = join(dir, RUN_FILES.record);
  if (!existsSync(file)) throw new UsageError(`${dir} is not a run directory (no ${RUN_FILES.record})`);
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as RunRecord;
  } catch (e) {
    throw new UsageError(`${file}: cannot be read (${(e as Error).message})`);
  }
}

/** A previous run's last state by species: full precision from state.bin, else the float properties of final.ply. */
export function loadRunState(dir: string): { species: string[]; values: Record<string, Float64Array> } {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new Error(`"${dir}" is not a run directory`);
  const bin = join(dir, RUN_FILES.state);
  if (existsSync(bin)) {
    const s = decodeState(readFileSync(bin), bin);
    const values: Record<string, Float64Array> = {};
    s.species.forEach((name, i) => (values[name] = speciesField(s.state, s.species.length, i)));
    return { species: s.species, values };
  }
  const ply = join(dir, RUN_FILES.final);
  if (!existsSync(ply)) throw new Error(`"${dir}" holds neither ${RUN_FILES.state} nor ${RUN_FILES.final}: is it a finished run?`);
  const values = loadSnapshot(ply).fields;
  return { species: Object.keys(values), values };
}

/**
 * Mark a run that is stopped without its own word (a second Ctrl-C, a killed
 * worker) as interrupted, so that its record says what happened; it resumes
 * from its last saved state. A record that is not "running" is left alone.
 */
export function markInterrupted(dir: string, why: string): void {
  const record = peekRunRecord(dir);
  if (!record || record.status !== 'running') return;
  const saved = record.analysis.frames[record.analysis.frames.length - 1]; // the last output, where the state was saved
  record.status = 'interrupted';
  record.stop = { reason: 'interrupted', time: saved?.time ?? 0, step: saved?.step ?? 0, message: `${why}; continue with: placode run --resume ${dir}` };
  record.updated = new Date().toISOString();
  try {
    writeFileAtomic(join(dir, RUN_FILES.record), JSON.stringify(record, null, 2) + '\n', true);
  } catch {
    // nothing more can be done on the way out; the run still resumes from state.bin
  }
}
