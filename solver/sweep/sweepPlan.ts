import { existsSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { ensureDirectory } from '../io/fileAccess.ts';
import { createHash } from 'node:crypto';
import { dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { parseCheckedYaml, parseScenario, compileSchema, pathText, validateScenario } from '../scenario/parseScenario.ts';
import type { Scenario } from '../scenario/Scenario.ts';
import { SWEEP_FILE_SCHEMA, isSweepFileText, type SweepSpec } from './Sweep.ts';
import { ScenarioError, type ScenarioProblem } from '../scenario/ScenarioError.ts';
import { expandSweep, applySweepPoint, sweepAxisProblems, pointLabel, varyingPaths } from './expandSweep.ts';
import { resolveScenario, problemsWithoutMesh } from '../scenario/resolveScenario.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { nodeScenarioEnvironment } from '../scenario/nodeScenarioEnvironment.ts';
import { UsageError } from '../UsageError.ts';
import { readTextFile } from '../io/readTextFile.ts';
import { VERSION } from '../version.ts';
import { SWEEP_FILES, type ManifestEntry } from './sweepFiles.ts';

export { SWEEP_FILES, type ManifestEntry } from './sweepFiles.ts';

export interface SweepPlan {
  tool: { name: string; version: string };
  created: string;
  source: string;
  sourceText: string;
  baseScenario: string;
  name: string;
  design: string;
  seed?: number;
  samples?: number;
  vary: SweepSpec['vary'];
  /** the varied paths that take more than one value */
  varying: string[];
  runs: number;
  duplicatesDropped: number;
}

const sweepFileCheck = compileSchema(SWEEP_FILE_SCHEMA);

/**
 * Read a sweep: a sweep file (`scenario:` + `vary:`) or a scenario with a
 * `sweep:` section. Returns the sweep, the base scenario (without its sweep
 * section) and the base scenario's file, against which its paths resolve.
 */
export function readSweep(file: string): { spec: SweepSpec; base: Scenario; baseFile: string; text: string } {
  const text = readTextFile(file, 'sweep file');
  if (isSweepFileText(text)) {
    const { data, locate } = parseCheckedYaml(text, file, sweepFileCheck, 'a sweep file must be a mapping with scenario and vary');
    const spec = data as unknown as SweepSpec;
    checkAxes(spec, file, (p) => locate(p));
    const baseFile = resolve(dirname(file), spec.scenario!);
    const base = parseScenario(readTextFile(baseFile, 'scenario file (the sweep\'s "scenario")'), baseFile).scenario;
    delete base.sweep;
    return { spec, base, baseFile, text };
  }
  const source = parseScenario(text, file);
  const { sweep, ...base } = source.scenario;
  if (!sweep) throw new UsageError(`${file} is a scenario without a sweep section: add sweep: {vary: {...}}, or write a sweep file with scenario: and vary:`);
  checkAxes(sweep, file, (p) => source.locate(['sweep', ...p]), 'sweep.');
  return { spec: sweep, base: base as Scenario, baseFile: resolve(file), text };
}

function checkAxes(spec: SweepSpec, file: string, locate: (path: string[]) => { line: number; column: number } | undefined, prefix = '') {
  const problems = sweepAxisProblems(spec).map((p) => ({ path: prefix + p.path, message: p.message, ...locate(p.path.startsWith('vary.') ? ['vary', p.path.slice(5)] : [p.path]) }));
  if (problems.length) throw new ScenarioError(file, problems);
}

/** The files a scenario names (mesh, previous run, keyframe stages), with their paths in the scenario. */
function sweepFilePaths(sc: Scenario): [string, string][] {
  const out: [string, string][] = [];
  if (sc.mesh?.file) out.push(['mesh.file', sc.mesh.file]);
  if (sc.initial?.from) out.push(['initial.from', sc.initial.from]);
  (sc.growth?.keyframes ?? []).forEach((k, j) => { if (k.file) out.push([`growth.keyframes[${j}].file`, k.file]); });
  return out;
}

/** The scenario paths that name files, relative to the scenario: re-pointed when a scenario is copied elsewhere. */
function repointFiles(sc: Scenario, from: string, to: string): void {
  const move = (p: string) => (isAbsolute(p) ? p : relative(to, resolve(from, p)).split('\\').join('/'));
  if (sc.mesh?.file) sc.mesh.file = move(sc.mesh.file);
  if (sc.initial?.from) sc.initial.from = move(sc.initial.from);
  for (const k of sc.growth?.keyframes ?? []) if (k.file) k.file = move(k.file);
}

export interface PlanOptions {
  out: string;
  force?: boolean;
  log?: (line: string) => void;
}

/**
 * `placode sweep plan`: expand a sweep into DIR/manifest.jsonl (one JSON line
 * per run), DIR/scenarios/ID.json (each run's complete scenario) and
 * DIR/sweep.json (what was planned, from what). Every point's scenario is
 * checked against the schema and the first one is resolved in full (mesh,
 * kinetics, formulas), so a mistake is found before hundreds of runs start.
 */
export function planSweep(file: string, options: PlanOptions): { dir: string; entries: ManifestEntry[]; plan: SweepPlan } {
  const log = options.log ?? ((s: string) => process.stderr.write(s + '\n'));
  const { spec, base, baseFile, text } = readSweep(file);
  const dir = resolve(options.out);
  const manifestFile = join(dir, SWEEP_FILES.manifest);
  if (existsSync(dir) && !statSync(dir).isDirectory()) throw new UsageError(`--out ${options.out} is a file, not a directory`);
  if (existsSync(manifestFile) && !options.force) {
    throw new UsageError(`${options.out} already holds a planned sweep; add --force to plan it again (finished runs whose scenario is unchanged keep their results), or choose a new --out`);
  }
  const points = expandSweep(spec);
  const varying = varyingPaths(points);
  const scenariosDir = join(dir, SWEEP_FILES.scenarios);
  const entries: ManifestEntry[] = [];
  const texts: string[] = [];
  const seen = new Set<string>();
  const problems: ScenarioProblem[] = [];
  let duplicates = 0;
  for (let i = 0; i < points.length; i++) {
    let sc: Scenario;
    try {
      sc = applySweepPoint(base, points[i]);
    } catch (e) {
      throw new ScenarioError(file, [{ path: '', message: (e as Error).message }]);
    }
    repointFiles(sc, dirname(baseFile), scenariosDir);
    const label = pointLabel(points[i], varying);
    if (!validateScenario(sc)) {
      for (const e of validateScenario.errors ?? []) {
        if (problems.length < 12) problems.push({ path: `point ${i} (${label})`, message: `the scenario's ${pathText(e.instancePath.split('/').slice(1)) || 'top level'} ${e.message ?? 'is not valid'}` });
      }
      continue;
    }
    // what can be checked without the mesh, at every point: formulas, models, painting; and that its files exist
    const pointProblems = problemsWithoutMesh({ scenario: sc, locate: () => undefined }, file);
    for (const [path, f] of sweepFilePaths(sc)) if (!existsSync(resolve(scenariosDir, f))) pointProblems.push({ path, message: `no such file ${resolve(scenariosDir, f)}` });
    for (const p of pointProblems) if (problems.length < 12) problems.push({ path: `point ${i} (${label}) ${p.path}`, message: p.message });
    if (pointProblems.length) continue;
    const json = JSON.stringify(sc, null, 2) + '\n';
    const id = createHash('sha256').update(json).digest('hex').slice(0, 12);
    if (seen.has(id)) {
      duplicates++;
      continue;
    }
    seen.add(id);
    entries.push({ index: entries.length, id, label, values: points[i], scenario: `${SWEEP_FILES.scenarios}/${id}.json`, run: `${SWEEP_FILES.runs}/${id}` });
    texts.push(json);
  }
  if (problems.length) throw new ScenarioError(file, problems);
  if (!entries.length) throw new UsageError(`${file}: the sweep has no points`);
  // resolve the first point in full: unknown parameters, bad formulas, missing meshes
  const first = join(scenariosDir, `${entries[0].id}.json`);
  let resolved;
  try {
    resolved = resolveScenario(parseScenario(texts[0], first), first, nodeScenarioEnvironment(first));
  } catch (e) {
    if (!(e instanceof ScenarioError)) throw e;
    throw new ScenarioError(file, e.problems.map((p) => ({ path: `point 0 (${pointLabel(entries[0].values)}) ${p.path}`, message: p.message })));
  }
  for (const w of resolved.warnings) log(`warning (point 0, ${entries[0].label}): ${w}`);

  ensureDirectory(scenariosDir, (m) => new UsageError(m));
  ensureDirectory(join(dir, SWEEP_FILES.runs), (m) => new UsageError(m));
  const keep = new Set(entries.map((e) => `${e.id}.json`));
  for (const old of readdirSync(scenariosDir)) if (!keep.has(old)) rmSync(join(scenariosDir, old), { force: true });
  entries.forEach((e, k) => writeFileAtomic(join(dir, e.scenario), texts[k], true));
  const plan: SweepPlan = {
    tool: { name: 'placode', version: VERSION },
    created: new Date().toISOString(),
    source: resolve(file),
    sourceText: text,
    baseScenario: baseFile,
    name: spec.name ?? base.name ?? 'sweep',
    design: spec.design ?? 'grid',
    seed: spec.design && spec.design !== 'grid' ? (spec.seed ?? 1) : undefined,
    samples: spec.samples,
    vary: spec.vary,
    varying,
    runs: entries.length,
    duplicatesDropped: duplicates,
  };
  writeFileAtomic(join(dir, SWEEP_FILES.plan), JSON.stringify(plan, null, 2) + '\n', true);
  writeFileAtomic(manifestFile, entries.map((e) => JSON.stringify(e)).join('\n') + '\n', true);
  return { dir, entries, plan };
}

/** Read a planned sweep directory's manifest and plan. */
export function readManifest(dirArg: string): { dir: string; entries: ManifestEntry[]; plan: SweepPlan } {
  const dir = resolve(dirArg);
  const manifestFile = join(dir, SWEEP_FILES.manifest);
  if (!existsSync(manifestFile)) throw new UsageError(`${dirArg} is not a planned sweep (no ${SWEEP_FILES.manifest}); make one with placode sweep plan SWEEP --out ${dirArg}`);
  const entries: ManifestEntry[] = [];
  readFileSync(manifestFile, 'utf8').split('\n').forEach((line, k) => {
    if (!line.trim()) return;
    try {
      const e = JSON.parse(line) as ManifestEntry;
      if (typeof e.id !== 'string' || typeof e.scenario !== 'string' || typeof e.run !== 'string' || e.index !== entries.length) throw new Error('expected {index, id, scenario, run, …} in order');
      entries.push(e);
    } catch (err) {
      throw new UsageError(`${manifestFile}:${k + 1}: not a manifest line (${(err as Error).message}); plan the sweep again with --force`);
    }
  });
  let plan: SweepPlan;
  try {
    plan = JSON.parse(readFileSync(join(dir, SWEEP_FILES.plan), 'utf8'));
  } catch (e) {
    throw new UsageError(`${join(dir, SWEEP_FILES.plan)}: cannot be read (${(e as Error).message}); plan the sweep again with --force`);
  }
  return { dir, entries, plan };
}
