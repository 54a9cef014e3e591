/**
 * `npm run faults`: replay the corpus of bad inputs and faults
 * (test/fixtures/faults/corpus.yaml) against the compiled command line, each
 * case a real process under a time limit, its peak memory read from
 * /proc/PID/status; then print a table and the totals the README's
 * reliability section quotes. Exits 1 if any case did not do what the corpus
 * says. Cases that need root (a small or read-only file system, mounted as
 * tmpfs) are skipped with a message where mounting is not allowed.
 */
import { spawn, spawnSync } from 'node:child_process';
import { appendFileSync, copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parse } from 'yaml';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { planSweep } from '../../solver/sweep/sweepPlan.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';
import { writeStl } from '../../solver/io/writeStl.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import { decodeState } from '../../solver/run/runFiles.ts';

const ROOT = resolve(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'solver', 'cli', 'placode.mjs');
/** Peak memory allowed: a fixed allowance for Node and the solver, plus a multiple of the input's size. */
const MEMORY_BASE_MB = 350;
const MEMORY_PER_INPUT_BYTE = 4;

interface FaultCase {
  id: string;
  about?: string;
  files?: Record<string, string>;
  setup?: string;
  args: string[];
  exit: number;
  stderr?: string;
  stdout?: string;
  stderrMax?: number;
  seconds?: number;
  sumTerms?: number;
  sparseName?: string;
  sparseHeader?: string;
}

interface Result {
  id: string;
  code: number | null;
  seconds: number;
  peakMb: number;
  budgetMb: number;
  hang: boolean;
  stackTrace: boolean;
  refusedNamed: boolean;
  resumeDifferences: number;
  problems: string[];
  skipped?: string;
}

/** Run placode in `cwd`; its exit code, output, time and peak resident memory (VmHWM, polled). */
function placode(args: string[], cwd: string, seconds: number, onStderr?: (text: string, child: ReturnType<typeof spawn>) => void, killAfterMs?: number): Promise<{ code: number | null; out: string; err: string; seconds: number; peakKb: number; hang: boolean }> {
  return new Promise((done) => {
    const t0 = performance.now();
    const child = spawn(process.execPath, [BIN, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '', err = '', peakKb = 0, hang = false;
    const poll = setInterval(() => {
      try {
        const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${child.pid}/status`, 'utf8'));
        if (m) peakKb = Math.max(peakKb, Number(m[1]));
      } catch {
        // the process has ended
      }
    }, 20);
    const limit = setTimeout(() => { hang = true; child.kill('SIGKILL'); }, seconds * 1000);
    const kill = killAfterMs === undefined ? undefined : setTimeout(() => child.kill('SIGKILL'), killAfterMs);
    child.stdout.on('data', (d) => (out += String(d)));
    child.stderr.on('data', (d) => {
      err += String(d);
      onStderr?.(err, child);
    });
    child.on('exit', (code) => {
      clearInterval(poll);
      clearTimeout(limit);
      if (kill) clearTimeout(kill);
      done({ code, out, err, seconds: (performance.now() - t0) / 1000, peakKb, hang });
    });
  });
}

/** The bytes of a run directory's outputs (the record aside: it holds times), for comparing runs. */
function outputs(dir: string): Map<string, Buffer> {
  const files = new Map<string, Buffer>();
  for (const f of ['final.ply', 'metrics.csv', 'state.bin']) if (existsSync(join(dir, f))) files.set(f, readFileSync(join(dir, f)));
  for (const f of readdirSync(join(dir, 'frames'))) files.set(`frames/${f}`, readFileSync(join(dir, 'frames', f)));
  return files;
}

function differences(a: Map<string, Buffer>, b: Map<string, Buffer>): string[] {
  const out: string[] = [];
  for (const [k, v] of a) if (!b.get(k)?.equals(v)) out.push(k);
  for (const k of b.keys()) if (!a.has(k)) out.push(`${k} (extra)`);
  return out;
}

const canMount = (() => {
  if (process.getuid?.() !== 0) return false;
  const probe = mkdtempSync(join(tmpdir(), 'placode-mount-'));
  const ok = spawnSync('mount', ['-t', 'tmpfs', '-o', 'size=64k', 'tmpfs', probe]).status === 0;
  if (ok) spawnSync('umount', [probe]);
  rmSync(probe, { recursive: true, force: true });
  return ok;
})();
const mounted: string[] = [];
function mountTmpfs(dir: string, options: string): void {
  mkdirSync(dir, { recursive: true });
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', options, 'tmpfs', dir], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`mount ${dir}: ${r.stderr}`);
  mounted.push(dir);
}
function unmountAll(): void {
  for (const d of mounted.splice(0)) spawnSync('umount', [d]);
}
/** Free bytes on the file system holding `dir`. */
function freeBytes(dir: string): number {
  const r = spawnSync('df', ['-B1', '--output=avail', dir], { encoding: 'utf8' });
  return Number(r.stdout.trim().split('\n').pop());
}

const quiet = { progress: 'none' as const, log: () => {} };

async function runCase(c: FaultCase, work: string): Promise<Result> {
  const dir = join(work, c.id);
  mkdirSync(dir, { recursive: true });
  const result: Result = { id: c.id, code: null, seconds: 0, peakMb: 0, budgetMb: 0, hang: false, stackTrace: false, refusedNamed: false, resumeDifferences: 0, problems: [] };
  let inputBytes = 0;
  for (const [name, text] of Object.entries(c.files ?? {})) {
    writeFileSync(join(dir, name), text);
    inputBytes += Buffer.byteLength(text);
  }
  const needsMount = ['full-disk', 'force-on-full-disk', 'read-only'].includes(c.setup ?? '');
  if (needsMount && !canMount) return { ...result, skipped: 'needs root to mount a small tmpfs' };
  let reference: Map<string, Buffer> | undefined;
  const referenceRun = async () => {
    await runScenarioFile(join(dir, 's.yaml'), { ...quiet, out: join(dir, 'reference') });
    return outputs(join(dir, 'reference'));
  };
  let onStderr: ((text: string, child: ReturnType<typeof spawn>) => void) | undefined;
  switch (c.setup) {
    case undefined: break;
    case 'sum-formula': {
      const n = c.sumTerms ?? 300;
      const text = `mesh: {shape: sphere, vertices: 300}\nkinetics: {species: [a], reactions: {a: '${Array(n).fill('a').join('+')} - ${n}*a'}, parameters: {}}\ndiffusion: {a: 1}\ninitial: {values: {a: 1}}\ntime: {end: 1, step: 0.1}\n`;
      writeFileSync(join(dir, 's.yaml'), text);
      inputBytes += text.length;
      break;
    }
    case 'big-scenario': {
      const text = `mesh: {shape: sphere}\nkinetics: {model: gray-scott}\ntime: {end: 1}\ndescription: "${'x'.repeat(50 * 2 ** 20)}"\n`;
      writeFileSync(join(dir, 's.yaml'), text);
      break; // refused by size: no allowance for it
    }
    case 'directory': mkdirSync(join(dir, 's.yaml')); break;
    case 'fifo':
      spawnSync('mkfifo', [join(dir, 'pipe.yaml'), join(dir, 'pipe.ply')]);
      break;
    case 'sparse': {
      const file = join(dir, c.sparseName!);
      writeFileSync(file, c.sparseHeader ?? '');
      truncateSync(file, 2 ** 30);
      break;
    }
    case 'truncated-stl':
      writeFileSync(join(dir, 'cut.stl'), writeStl(icosphere(4)).subarray(0, 700));
      break;
    case 'read-only':
      mountTmpfs(join(dir, 'ro'), 'size=1m,ro');
      break;
    case 'empty-frames':
      mkdirSync(join(dir, 'old', 'frames'), { recursive: true });
      break;
    case 'full-disk':
      reference = await referenceRun();
      mountTmpfs(join(dir, 'disk'), 'size=160k');
      break;
    case 'force-on-full-disk': {
      mountTmpfs(join(dir, 'disk'), 'size=1m');
      await runScenarioFile(join(dir, 's.yaml'), { ...quiet, out: join(dir, 'disk', 'run') });
      reference = outputs(join(dir, 'disk', 'run'));
      // leave less room than the new run's first frame needs
      const filler = freeBytes(join(dir, 'disk')) - 8 * 1024;
      if (filler > 0) writeFileSync(join(dir, 'disk', 'filler'), Buffer.alloc(filler));
      break;
    }
    case 'corrupt-state': {
      await runScenarioFile(join(dir, 's.yaml'), { ...quiet, out: join(dir, 'run'), interruptAfterSteps: 250 });
      const file = join(dir, 'run', 'state.bin');
      const bytes = readFileSync(file);
      for (let k = 0; k < 16; k++) bytes[bytes.length - 100 - 7 * k] ^= 0x5a;
      writeFileSync(file, bytes);
      break;
    }
    case 'foreign-state': {
      await runScenarioFile(join(dir, 's.yaml'), { ...quiet, out: join(dir, 'run'), interruptAfterSteps: 250 });
      writeFileSync(join(dir, 'other.yaml'), readFileSync(join(dir, 's.yaml'), 'utf8').replace('F: 0.03', 'F: 0.031'));
      await runScenarioFile(join(dir, 'other.yaml'), { ...quiet, out: join(dir, 'other'), interruptAfterSteps: 250 });
      copyFileSync(join(dir, 'other', 'state.bin'), join(dir, 'run', 'state.bin'));
      break;
    }
    case 'finished-run':
      await runScenarioFile(join(dir, 's.yaml'), { ...quiet, out: join(dir, 'run') });
      break;
    case 'damaged-manifest':
      planSweep(join(dir, 'w.yaml'), { out: join(dir, 'sw'), log: () => {} });
      appendFileSync(join(dir, 'sw', 'manifest.jsonl'), '{"index": 7, "broken\n');
      writeFileSync(join(dir, 'sw', 'manifest.jsonl'), readFileSync(join(dir, 'sw', 'manifest.jsonl'), 'utf8').split('\n').filter((_, i) => i !== 1).join('\n'));
      break;
    case 'sigint-twice': {
      reference = await referenceRun();
      let sent = false;
      onStderr = (text, child) => {
        if (!sent && /^ {2}t=/m.test(text)) {
          sent = true;
          child.kill('SIGINT');
          child.kill('SIGINT');
        }
      };
      break;
    }
    case 'kill-resume':
      reference = await referenceRun();
      break;
    case 'blow-up': break;
    default: throw new Error(`unknown setup ${c.setup}`);
  }
  result.budgetMb = MEMORY_BASE_MB + (MEMORY_PER_INPUT_BYTE * inputBytes) / 2 ** 20;
  const limit = c.seconds ?? 30;
  const r = c.setup === 'kill-resume' ? await killAndResume(c, dir, limit) : await placode(c.args, dir, limit, onStderr);
  Object.assign(result, { code: r.code, seconds: r.seconds, peakMb: r.peakKb / 1024, hang: r.hang });
  result.stackTrace = /\n\s+at .+[(:]\d+/.test(r.err);
  if (r.hang) result.problems.push(`did not finish within ${limit} s`);
  if (r.code !== c.exit) result.problems.push(`exit ${r.code}, expected ${c.exit}: ${r.err.slice(-300)}`);
  if (c.stderr) {
    if (new RegExp(c.stderr).test(r.err)) result.refusedNamed = c.exit === 1 || c.exit === 2;
    else result.problems.push(`stderr does not match /${c.stderr}/: ${r.err.slice(0, 400)}`);
  }
  if (c.stdout && !new RegExp(c.stdout).test(r.out)) result.problems.push(`stdout does not match /${c.stdout}/: ${r.out.slice(0, 300)}`);
  if (c.stderrMax !== undefined && r.err.length > c.stderrMax) result.problems.push(`the message is ${r.err.length} characters long (at most ${c.stderrMax})`);
  if (result.stackTrace) result.problems.push('printed a stack trace');
  if (result.peakMb > result.budgetMb) result.problems.push(`peak memory ${result.peakMb.toFixed(0)} MB above ${result.budgetMb.toFixed(0)} MB`);
  // after-effects: what must hold on disk, and resumes that must give the uninterrupted result
  const checkResume = async (run: string, again: string[]) => {
    const resumed = await placode(again, dir, 120);
    if (resumed.code !== 0) result.problems.push(`resume exit ${resumed.code}: ${resumed.err.slice(-300)}`);
    const diff = differences(reference!, outputs(join(dir, run)));
    result.resumeDifferences += diff.length;
    if (diff.length) result.problems.push(`resumed run differs from the uninterrupted one in ${diff.join(', ')}`);
  };
  if (c.setup === 'full-disk') {
    const left = readdirSync(join(dir, 'disk', 'run'), { recursive: true }).map(String).filter((f) => f.endsWith('.tmp'));
    if (left.length) result.problems.push(`temporary files left: ${left.join(', ')}`);
    const record = JSON.parse(readFileSync(join(dir, 'disk', 'run', 'record.json'), 'utf8'));
    if (record.status !== 'failed') result.problems.push(`record status ${record.status}, expected failed`);
    spawnSync('mount', ['-o', 'remount,size=8m', join(dir, 'disk')]);
    await checkResume(join('disk', 'run'), ['run', '--resume', join('disk', 'run'), '--progress', 'none']);
  }
  if (c.setup === 'force-on-full-disk') {
    const diff = differences(reference!, outputs(join(dir, 'disk', 'run')));
    result.resumeDifferences += diff.length;
    if (diff.length) result.problems.push(`the old run changed: ${diff.join(', ')}`);
    if (readdirSync(join(dir, 'disk')).some((f) => f.includes('.new-'))) result.problems.push('the new run\'s directory was left behind');
  }
  if (c.setup === 'sigint-twice') {
    const record = JSON.parse(readFileSync(join(dir, 'run', 'record.json'), 'utf8'));
    if (record.status !== 'interrupted') result.problems.push(`record status ${record.status} after a second Ctrl-C, expected interrupted`);
    await checkResume('run', ['run', '--resume', 'run', '--progress', 'none']);
  }
  if (c.setup === 'kill-resume') {
    const diff = differences(reference!, outputs(join(dir, 'run')));
    result.resumeDifferences += diff.length;
    if (diff.length) result.problems.push(`killed and resumed run differs from the uninterrupted one in ${diff.join(', ')}`);
  }
  if (c.setup === 'blow-up') {
    const final = loadMeshFile(join(dir, 'run', 'final.ply'));
    const a = final.vertexData.species_a;
    if (!a || !a.every(Number.isFinite)) result.problems.push('final.ply holds values that are not finite');
    const saved = decodeState(readFileSync(join(dir, 'run', 'state.bin')), 'state.bin');
    if (!saved.state.every(Number.isFinite)) result.problems.push('state.bin holds values that are not finite');
  }
  if (c.setup === 'force-on-full-disk' || c.setup === 'full-disk' || c.setup === 'read-only') unmountAll();
  return result;
}

/**
 * Start the run and kill it (SIGKILL) at five seeded random moments, resuming
 * it each time (or starting it again when the kill came before its first
 * record), then let it finish: the outputs must be those of an uninterrupted run.
 */
async function killAndResume(c: FaultCase, dir: string, limit: number) {
  const rand = seededRandom(2026);
  rmSync(join(dir, 'run'), { recursive: true, force: true });
  const resume = ['run', '--resume', 'run', '--progress', 'none'];
  for (let k = 0; k < 5; k++) {
    const args = existsSync(join(dir, 'run', 'record.json')) ? resume : c.args;
    const r = await placode(args, dir, limit, undefined, 400 + 1600 * rand());
    if (r.code === 0) return r; // finished before the kill
    if (r.code !== null) return r; // an error, not a kill: reported as it is
  }
  return placode(existsSync(join(dir, 'run', 'record.json')) ? resume : c.args, dir, limit);
}

async function main() {
  const corpus = parse(readFileSync(join(ROOT, 'test', 'fixtures', 'faults', 'corpus.yaml'), 'utf8'), { maxAliasCount: -1 }) as { cases: FaultCase[] };
  const only = process.argv[2];
  const work = mkdtempSync(join(tmpdir(), 'placode-faults-'));
  const results: Result[] = [];
  try {
    for (const c of corpus.cases) {
      if (only && !c.id.includes(only)) continue;
      const r = await runCase(c, work).catch((e) => ({ id: c.id, code: null, seconds: 0, peakMb: 0, budgetMb: 0, hang: false, stackTrace: false, refusedNamed: false, resumeDifferences: 0, problems: [`the case itself failed: ${(e as Error).stack}`] }) as Result);
      results.push(r);
      const verdict = r.skipped ? `skipped (${r.skipped})` : r.problems.length ? `FAIL: ${r.problems.join('; ')}` : 'ok';
      process.stdout.write(`${r.id.padEnd(28)} exit ${String(r.code).padStart(4)}  ${r.seconds.toFixed(1).padStart(5)} s  ${r.peakMb.toFixed(0).padStart(5)} MB  ${verdict}\n`);
    }
  } finally {
    unmountAll();
    rmSync(work, { recursive: true, force: true });
  }
  const ran = results.filter((r) => !r.skipped);
  /** refusals: errors of usage (exit 2) or of data (exit 1); 3 is a run that blew up, 130 an interrupted one */
  const refusal = (c: FaultCase) => c.exit === 1 || c.exit === 2;
  const expectedRefusals = corpus.cases.filter((c) => refusal(c) && results.some((r) => r.id === c.id && !r.skipped)).length;
  const meant = (r: Result) => corpus.cases.find((c) => c.id === r.id)!;
  const rows = [
    ['inputs and faults replayed', `${ran.length}${results.length > ran.length ? ` (${results.length - ran.length} skipped)` : ''}`],
    ['refused, with the file, key or line named', `${ran.filter((r) => r.refusedNamed).length} of ${expectedRefusals} meant to be refused`],
    ['accepted and done within their limits (long formulas, resumes, a mesh with no genus)', `${ran.filter((r) => meant(r).exit === 0 && !r.problems.length).length} of ${ran.filter((r) => meant(r).exit === 0).length}`],
    ['hangs (over the case\'s time limit)', String(ran.filter((r) => r.hang).length)],
    [`runaway memory (peak RSS over ${MEMORY_BASE_MB} MB + ${MEMORY_PER_INPUT_BYTE}× the input)`, String(ran.filter((r) => r.peakMb > r.budgetMb).length)],
    ['stack traces printed', String(ran.filter((r) => r.stackTrace).length)],
    ['differences after a resume or a refused replacement (files)', String(ran.reduce((a, r) => a + r.resumeDifferences, 0))],
    ['cases not as the corpus says', String(ran.filter((r) => r.problems.length).length)],
    ['largest peak memory', `${Math.max(...ran.map((r) => r.peakMb)).toFixed(0)} MB`],
    ['longest case', `${Math.max(...ran.map((r) => r.seconds)).toFixed(1)} s`],
  ];
  process.stdout.write(`\n| measure | count |\n|---|---:|\n${rows.map(([k, v]) => `| ${k} | ${v} |`).join('\n')}\n`);
  process.exitCode = ran.some((r) => r.problems.length) ? 1 : 0;
}

await main();
