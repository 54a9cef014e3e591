import { appendFileSync, mkdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { readManifest } from './sweepPlan.ts';
import { runStatus } from './sweepTask.ts';
import { UsageError } from './UsageError.ts';
import { VERSION } from './version.ts';

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
 * `placode sweep slurm`: write DIR/slurm/array.sbatch, a Slurm job array with
 * one task per unfinished run (the array index is the manifest index), each
 * running `placode sweep task DIR --index $SLURM_ARRAY_TASK_ID`; with
 * `submit`, hand it to sbatch. Slurm schedules, retries and limits; the run
 * directories say what is done. A task killed at its time limit gets SIGTERM
 * first and saves its state, so submitting again resumes it.
 */
export function writeSlurmArray(dirArg: string, o: SlurmOptions): { script: string; indices: number[]; jobId?: string; text: string } {
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
  const launcher = o.launcher ?? `${quote(process.execPath)} ${quote(fileURLToPath(new URL('./placode.mjs', import.meta.url)))}`;
  const name = `placode-${plan.name}`.replace(/[^A-Za-z0-9_.-]/g, '_').slice(0, 64);
  const lines = [
    '#!/bin/bash',
    `# Slurm job array for the sweep in ${dir}`,
    `# written by placode ${VERSION} (sweep slurm) on ${new Date().toISOString()}: ${indices.length} of ${entries.length} runs.`,
    '# Each task runs one manifest entry; the run directories under runs/ record what is done.',
    `#SBATCH --job-name=${name}`,
    `#SBATCH --array=${arraySpec(indices)}${o.maxParallel ? `%${o.maxParallel}` : ''}`,
    `#SBATCH --output=${join(slurmDir, 'logs', '%A_%a.out')}`,
    '#SBATCH --ntasks=1',
    '#SBATCH --cpus-per-task=1',
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    ...(o.time ? [`#SBATCH --time=${o.time}`] : []),
    ...(o.mem ? [`#SBATCH --mem=${o.mem}`] : []),
    'set -eu',
    `exec ${launcher} sweep task ${quote(dir)} --index "$SLURM_ARRAY_TASK_ID"${o.retryFailed ? ' --retry-failed' : ''}`,
    '',
  ];
  const script = join(slurmDir, 'array.sbatch');
  const text = lines.join('\n');
  writeFileAtomic(script, text, true);
  if (!o.submit) return { script, indices, text };
  const r = spawnSync('sbatch', ['--parsable', script], { encoding: 'utf8' });
  if (r.error) {
    const missing = (r.error as NodeJS.ErrnoException).code === 'ENOENT';
    throw new UsageError(`${missing ? 'sbatch was not found: is this a Slurm login node?' : `sbatch could not start: ${r.error.message}`} The script is written: submit it where Slurm runs with sbatch ${script}`);
  }
  if (r.status !== 0) throw new UsageError(`sbatch refused ${script}: ${(r.stderr || r.stdout).trim()}`);
  const jobId = r.stdout.trim().split(';')[0];
  appendFileSync(join(slurmDir, 'jobs.jsonl'), JSON.stringify({ jobId, submitted: new Date().toISOString(), indices: arraySpec(indices), script }) + '\n');
  return { script, indices, jobId, text };
}
