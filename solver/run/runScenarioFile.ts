import { existsSync, readFileSync, rmSync, statSync } from 'node:fs';
import { ensureDirectory, holdsNoFiles, removeTemporaries } from '../io/fileAccess.ts';
import { join, resolve } from 'node:path';
import { parseScenario } from '../scenario/parseScenario.ts';
import { isSweepFileText } from '../sweep/Sweep.ts';
import { resolveScenario, type ResolvedScenario } from '../scenario/resolveScenario.ts';
import { nodeScenarioEnvironment } from '../scenario/nodeScenarioEnvironment.ts';
import { ScenarioError } from '../scenario/ScenarioError.ts';
import { RUN_FILES, decodeState } from './runFiles.ts';
import { newRunRecord } from './RunRecord.ts';
import { readRunRecord } from './runDirectory.ts';
import { meshChecksum, textChecksum } from './meshChecksum.ts';
import { runLog, writeRun, type RunOptions, type RunOutcome } from './writeRun.ts';
import { UsageError } from '../UsageError.ts';
import { readTextFile } from '../io/readTextFile.ts';
import { VERSION } from '../version.ts';

export type { RunOptions, RunOutcome } from './writeRun.ts';

/** Read, check and resolve a scenario file (meshes and previous runs found relative to it). */
export function loadScenarioFile(file: string, progress?: (line: string) => void): { text: string; resolved: ResolvedScenario } {
  const text = readTextFile(file, 'scenario file');
  let source;
  try {
    source = parseScenario(text, file);
  } catch (e) {
    // a sweep file fails the scenario schema: say what it is instead
    if (e instanceof ScenarioError && isSweepFileText(text)) {
      throw new UsageError(`${file} is a sweep file (scenario: + vary:), not a scenario: expand it with placode sweep plan ${file} --out DIR`);
    }
    throw e;
  }
  return { text, resolved: resolveScenario(source, file, nodeScenarioEnvironment(file, progress)) };
}

/** Check a scenario and return its resolved plan (what `run` would do), without running it. */
export function checkScenario(file: string): Record<string, unknown> {
  const r = loadScenarioFile(file).resolved;
  return { ...r.summary, vertices: r.mesh.positions.length / 3, warnings: r.warnings, meshNotes: r.meshNotes, ...(r.growth?.stages ? { stages: r.growth.stages } : {}) };
}

/**
 * Start a new run of a scenario file into `options.out`. With `force` over an
 * existing run, the new run is written beside it and takes its place only once
 * its first state is written, so a run that cannot start (a bad scenario, a
 * full disk) never costs the old one.
 */
export async function runScenarioFile(file: string, options: RunOptions): Promise<RunOutcome> {
  if (!options.out) throw new UsageError('say where the run goes: --out DIR');
  const out = resolve(options.out);
  if (existsSync(out) && !statSync(out).isDirectory()) throw new UsageError(`--out ${options.out} is a file, not a directory`);
  const replacing = !holdsNoFiles(out);
  if (replacing && !options.force) {
    throw new UsageError(`${options.out} already holds files; choose a new --out, add --force to replace it, or continue it with placode run --resume ${options.out}`);
  }
  const t0 = performance.now();
  const { text, resolved } = loadScenarioFile(file, options.progress === 'none' ? undefined : runLog(options));
  const dir = replacing ? `${out}.new-${process.pid}` : out;
  if (replacing) rmSync(dir, { recursive: true, force: true });
  ensureDirectory(replacing ? dir : options.out, (m) => new UsageError(`--out ${m}`));
  ensureDirectory(join(dir, RUN_FILES.frames), (m) => new UsageError(m));
  const record = newRunRecord(resolved, {
    version: VERSION, node: process.version, platform: `${process.platform}-${process.arch}`, command: options.command ?? [],
    scenarioFile: resolve(file), scenarioText: text, checksum: meshChecksum(resolved.mesh),
  });
  return writeRun({ dir, replacing: replacing ? out : undefined }, resolved, record, undefined, [], options, t0);
}

/** Continue an interrupted run from its saved state; the result is the same as an uninterrupted run's. */
export async function resumeRun(dir: string, options: RunOptions): Promise<RunOutcome> {
  const out = resolve(dir);
  const record = readRunRecord(dir);
  if (record.status !== 'running' && record.status !== 'interrupted' && record.status !== 'failed') {
    throw new UsageError(`${dir} has already finished (${record.stop?.message ?? record.status}); nothing to resume`);
  }
  const t0 = performance.now();
  const resolved = resolveScenario(parseScenario(record.scenarioText, record.scenarioFile), record.scenarioFile, nodeScenarioEnvironment(record.scenarioFile));
  const checksum = meshChecksum(resolved.mesh);
  if (checksum !== record.mesh.checksum) {
    throw new UsageError(`the mesh of ${dir} has changed since the run started (checksum ${checksum.slice(0, 19)}… ≠ ${record.mesh.checksum.slice(0, 19)}…): resume needs the same mesh`);
  }
  const stateFile = join(out, RUN_FILES.state);
  if (!existsSync(stateFile)) throw new UsageError(`${dir} has no saved state (${RUN_FILES.state}) to resume from`);
  const saved = decodeState(readFileSync(stateFile), stateFile);
  if (saved.scenarioChecksum !== undefined && saved.scenarioChecksum !== textChecksum(record.scenarioText)) {
    throw new UsageError(`${stateFile} belongs to another scenario than the one in ${join(dir, RUN_FILES.record)}: it cannot be resumed from; start the run again with --force`);
  }
  if (saved.meshChecksum !== checksum || saved.dt !== resolved.dt || saved.species.join() !== resolved.species.join()) {
    throw new UsageError(`${stateFile} does not belong to this run's mesh, step or species`);
  }
  // keep metrics rows and frames up to the saved step
  const metricsFile = join(out, RUN_FILES.metrics);
  const rows = existsSync(metricsFile) ? readFileSync(metricsFile, 'utf8').trim().split('\n').slice(1).filter((r) => Number(r.split(',')[1]) <= saved.step) : [];
  record.frames = record.frames.filter((f) => f.step <= saved.step);
  record.analysis.frames = record.analysis.frames.filter((f) => f.step <= saved.step);
  record.analysis.events = record.analysis.events.filter((e) => e.time <= saved.time);
  removeTemporaries(out);
  return writeRun({ dir: out }, resolved, record, saved, rows, options, t0);
}
