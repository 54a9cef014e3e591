import { appendFileSync, mkdirSync, readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { packageFile } from '../packageRoot.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { readManifest } from './sweepPlan.ts';
import { runStatus } from './sweepTask.ts';
import { UsageError } from '../UsageError.ts';
import { VERSION } from '../version.ts';
import { SWEEP_RUN_THREADS } from '../defaults.ts';

export interface SlurmOptions {
  partition?: string;
  /** wall time of each task, in any form sbatch takes (minutes, HH:MM:SS, D-HH:MM …) */
  time?: string;
  /** memory of each task, as sbatch takes it (e.g. 2G) */
  mem?: string;
  /** most tasks running at once (the %K of --array) */
  maxParallel?: number;
  /** include finished runs (default: only the unfinished ones) */
  all?: boolean;
  /** include failed runs (and have the tasks run them again) */
  retryFailed?: boolean;
  /** the command that starts placode on the compute nodes (default: this Node and this placode, by absolute path) */
  launcher?: string;
  /** submit with sbatch after writing */
  submit?: boolean;
  /** the cluster's MaxArraySize (array indices must stay below it); default: asked of scontrol, else Slurm's default 1001 */
  maxArraySize?: number;
}

/** Slurm's time formats: minutes, MM:SS, HH:MM:SS, D-HH, D-HH:MM, D-HH:MM:SS. */
const SLURM_TIME = /^(\d+|\d+:\d{1,2}|\d+:\d{1,2}:\d{1,2}|\d+-\d{1,2}|\d+-\d{1,2}:\d{1,2}|\d+-\d{1,2}:\d{1,2}:\d{1,2})$/;
const SLURM_MEM = /^\d+[KMGT]?$/i;

const quote = (s: string) => (/^[A-Za-z0-9_./=:@%+-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);

/** Sorted indices as Slurm's array syntax: 0-3,7,9-12. */
export function arraySpec(indices: readonly number[]): string {
  const parts: string[] = [];
  for (let i = 0; i < indices.length; ) {
    let j = i;
    while (j + 1 < indices.length && indices[j + 1] === indices[j] + 1) j++;
    parts.push(i === j ? String(indices[i]) : `${indices[i]}-${indices[j]}`);
    i = j + 1;
  }
  return parts.join(',');
}

/**
 * Split manifest indices into job arrays whose task ids stay below Slurm's
 * MaxArraySize: chunk c holds indices c·max … (c+1)·max − 1, each task id
 * being the index minus the chunk's offset.
 */
export function arrayChunks(indices: readonly number[], maxArraySize: number): { offset: number; ids: number[] }[] {
  const chunks = new Map<number, number[]>();
  for (const i of indices) {
    const offset = Math.floor(i / maxArraySize) * maxArraySize;
    if (!chunks.has(offset)) chunks.set(offset, []);
    chunks.get(offset)!.push(i - offset);
  }
  return [...chunks.entries()].sort((a, b) => a[0] - b[0]).map(([offset, ids]) => ({ offset, ids }));
}

/** Threads a run of the sweep steps with: its scenario's time.threads, or SWEEP_RUN_THREADS. */
function runThreads(scenarioFile: string): number {
  try {
    const threads = (JSON.parse(readFileSync(scenarioFile, 'utf8')) as { time?: { threads?: unknown } }).time?.threads;
    return typeof threads === 'number' && Number.isInteger(threads) && threads >= 1 ? threads : SWEEP_RUN_THREADS;
  } catch {
    return SWEEP_RUN_THREADS; // the task reports a missing or broken scenario itself
  }
}

/** The cluster's MaxArraySize, from scontrol (undefined where scontrol does not answer). */
function clusterMaxArraySize(): number | undefined {
  const r = spawnSync('scontrol', ['show', 'config'], { encoding: 'utf8', timeout: 10_000 });
  const m = r.status === 0 ? /^MaxArraySize\s*=\s*(\d+)/m.exec(r.stdout) : null;
  return m ? Number(m[1]) : undefined;
}

/**
 * `placode sweep slurm`: write DIR/slurm/array.sbatch, a Slurm job array with
 * one task per unfinished run (the array index is the manifest index), each
 * running `placode sweep task DIR --index $SLURM_ARRAY_TASK_ID`; with
 * `submit`, hand it to sbatch. Sweeps larger than the cluster's MaxArraySize
 * get several arrays (array-1.sbatch, …), each adding its offset. Slurm schedules, retries and limits; the run
 * directories say what is done. A task killed at its time limit gets SIGTERM
 * first and saves its state, so submitting again resumes it.
 */
export function writeSlurmArray(dirArg: string, o: SlurmOptions): { scripts: string[]; indices: number[]; jobIds: string[] } {
  const { dir, entries, plan } = readManifest(dirArg);
  if (o.time !== undefined && !SLURM_TIME.test(o.time)) throw new UsageError(`--time "${o.time}": give minutes, HH:MM:SS or D-HH:MM:SS`);
  if (o.mem !== undefined && !SLURM_MEM.test(o.mem)) throw new UsageError(`--mem "${o.mem}": give a size such as 2G or 500M`);
  if (o.partition !== undefined && !/^[A-Za-z0-9_.-]+$/.test(o.partition)) throw new UsageError(`--partition "${o.partition}" is not a partition name`);
  const indices = entries
    .filter((e) => {
      if (o.all) return true;
      const s = runStatus(dir, e).state;
      return s !== 'done' && (s !== 'failed' || o.retryFailed);
    })
    .map((e) => e.index);
  if (!indices.length) throw new UsageError(`every run of ${dirArg} is finished; nothing to submit (--all writes the whole array, --retry-failed includes failed runs)`);
  const slurmDir = join(dir, 'slurm');
  mkdirSync(join(slurmDir, 'logs'), { recursive: true });
  const launcher = o.launcher ?? `${quote(process.execPath)} ${quote(packageFile('solver/cli/placode.mjs'))}`;
  const name = `placode-${plan.name}`.replace(/[^A-Za-z0-9_.-]/g, '_').slice(0, 64);
  const maxArraySize = o.maxArraySize ?? clusterMaxArraySize() ?? 1001;
  const chunks = arrayChunks(indices, maxArraySize);
  const scripts = chunks.map((chunk, c) => {
    const cpus = Math.max(...chunk.ids.map((id) => runThreads(join(dir, entries[chunk.offset + id].scenario))));
    const lines = [
      '#!/bin/bash',
      `# Slurm job array for the sweep in ${dir}`,
      `# written by placode ${VERSION} (sweep slurm) on ${new Date().toISOString()}: ${chunk.ids.length} of ${entries.length} runs` +
        (chunks.length > 1 ? `, part ${c + 1} of ${chunks.length} (task ids stay below MaxArraySize ${maxArraySize}; manifest index = ${chunk.offset} + task id).` : '.'),
      '# Each task runs one manifest entry; the run directories under runs/ record what is done.',
      `#SBATCH --job-name=${name}`,
      `#SBATCH --array=${arraySpec(chunk.ids)}${o.maxParallel ? `%${o.maxParallel}` : ''}`,
      `#SBATCH --output=${join(slurmDir, 'logs', '%A_%a.out')}`,
      '#SBATCH --ntasks=1',
      `#SBATCH --cpus-per-task=${cpus}`,
      ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
      ...(o.time ? [`#SBATCH --time=${o.time}`] : []),
      ...(o.mem ? [`#SBATCH --mem=${o.mem}`] : []),
      'set -eu',
      `exec ${launcher} sweep task ${quote(dir)} --index ${chunk.offset ? `"$((${chunk.offset} + SLURM_ARRAY_TASK_ID))"` : '"$SLURM_ARRAY_TASK_ID"'}${o.retryFailed ? ' --retry-failed' : ''}`,
      '',
    ];
    const script = join(slurmDir, chunks.length > 1 ? `array-${c + 1}.sbatch` : 'array.sbatch');
    writeFileAtomic(script, lines.join('\n'), true);
    return script;
  });
  if (!o.submit) return { scripts, indices, jobIds: [] };
  const jobIds: string[] = [];
  for (const script of scripts) {
    const r = spawnSync('sbatch', ['--parsable', script], { encoding: 'utf8' });
    if (r.error) {
      const missing = (r.error as NodeJS.ErrnoException).code === 'ENOENT';
      throw new UsageError(`${missing ? 'sbatch was not found: is this a Slurm login node?' : `sbatch could not start: ${r.error.message}`} The script${scripts.length > 1 ? 's are' : ' is'} written: submit ${scripts.length > 1 ? 'them' : 'it'} where Slurm runs with sbatch ${scripts.join(' ; sbatch ')}`);
    }
    if (r.status !== 0) throw new UsageError(`sbatch refused ${script}: ${(r.stderr || r.stdout).trim()}${jobIds.length ? ` (jobs ${jobIds.join(', ')} were submitted before it)` : ''}`);
    const jobId = r.stdout.trim().split(';')[0];
    jobIds.push(jobId);
    appendFileSync(join(slurmDir, 'jobs.jsonl'), JSON.stringify({ jobId, submitted: new Date().toISOString(), script }) + '\n');
  }
  return { scripts, indices, jobIds };
}
