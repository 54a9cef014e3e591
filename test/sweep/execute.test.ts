import { describe, expect, it } from 'vitest';
import { readFileSync, existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { planSweep } from '../../solver/sweep/sweepPlan.ts';
import { runSweepLocal } from '../../solver/sweep/sweepPool.ts';
import { sweepStatus } from '../../solver/sweep/sweepTask.ts';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';

const temp = useTempFiles('placode-sweep-run-');
const write = temp.write;

const BASE = `
seed: 3
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 400}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial:
  spots: {count: 2, radius: 0.08, values: {u: 0.5, v: 0.25}}
time: {scheme: imex, step: 1, end: 60}
output: {every: 20}
analysis: {modes: 10}
`;

const RESULTS = ['state.bin', 'final.ply', 'metrics.csv', 'frames/0003.ply'];

describe('placode sweep run (local worker pool)', () => {
  it('runs every point on two workers, bit for bit as sequential runs; a failing point is recorded and the others go on', async () => {
    write('base.yaml', BASE);
    // a mesh file that exists but is broken is found when its run reads it (plan time checks every point's formulas
    // and that its files exist, and reads only point 0's mesh)
    write('broken.ply', 'ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n0 0 0\n1 0 0\n0 1 0\n3 0 1 9\n');
    const sweep = write('pool.yaml', 'scenario: base.yaml\nvary:\n  mesh: [{shape: sphere, params: {radius: 0.25}, vertices: 400}, {shape: sphere, params: {radius: 0.25}, vertices: 420}, {file: broken.ply}]\n  kinetics.parameters.k: [0.055, 0.062]\n');
    const out = temp.path('pool');
    const { entries } = planSweep(sweep, { out, log: () => {} });
    const r = await runSweepLocal(out, { workers: 2, progress: 'none', log: () => {} });
    expect(r).toMatchObject({ total: 6, done: 4, skipped: 0, unfinished: 0, interrupted: false, workers: 2 });
    expect(r.failed.map((f) => f.index)).toEqual([4, 5]);
    expect(r.failed[0].message).toMatch(/mesh\.file: .*broken\.ply: face 0 uses vertex 9/);
    expect(JSON.parse(readFileSync(join(out, entries[4].run, 'failure.json'), 'utf8')).message).toMatch(/broken\.ply/);
    for (const e of entries.slice(0, 4)) {
      const seq = temp.path(`seq-${e.id}`);
      const o = await runScenarioFile(join(out, e.scenario), { out: seq, progress: 'none', log: () => {} });
      expect(o.reason).toBe('end');
      for (const f of RESULTS) expect(readFileSync(join(out, e.run, f)).equals(readFileSync(join(seq, f))), `${e.label} ${f}`).toBe(true);
    }
    // a second call skips what is finished, failed runs included, and still says that runs failed (exit 1)
    const again = await runSweepLocal(out, { workers: 2, progress: 'none', log: () => {} });
    expect(again).toMatchObject({ done: 0, skipped: 6, failedBefore: 2, failed: [] });
    const rerun = await run('sweep', 'run', out, '--progress', 'none');
    expect(rerun.code).toBe(1);
    expect(rerun.out).toMatch(/2 run\(s\) failed in an earlier call/);
    const status = await run('sweep', 'status', out);
    expect(status.out).toMatch(/6 runs — 4 done, 2 failed, 0 running, 0 interrupted, 0 pending/);
    expect(status.out).toMatch(/failed 4 \(.*k=0\.055\): [\s\S]*broken\.ply: face 0 uses vertex 9/); // the whole message, not its first line
  });

  it('an interrupted sweep resumes where it stopped, and ends with the same results as an uninterrupted one', async () => {
    write('base.yaml', BASE.replace('every: 20', 'every: 100'));
    // the second point runs 30 times longer: the pool is stopped once the first has finished and the
    // second has started stepping, so the second is mid-run when the stop reaches it
    const sweep = write('resume.yaml', 'scenario: base.yaml\nvary:\n  time.end: [100, 3000]\n');
    const out = temp.path('resume');
    const { entries } = planSweep(sweep, { out, log: () => {} });
    const first = await runSweepLocal(out, { workers: 2, progress: 'none', log: () => {}, stopWhen: (p) => p.finished >= 1 && p.running >= 1 });
    expect(first).toMatchObject({ interrupted: true, done: 1, unfinished: 1 });
    expect(sweepStatus(out).runs.map((r) => r.state)).toEqual(['done', 'interrupted']);
    const saved = JSON.parse(readFileSync(join(out, entries[1].run, 'record.json'), 'utf8')).stop.step;
    expect(saved).toBeGreaterThan(0);
    expect(saved).toBeLessThan(3000);
    const second = await runSweepLocal(out, { workers: 2, progress: 'none', log: () => {} });
    expect(second).toMatchObject({ skipped: 1, done: 1, interrupted: false });
    const record = JSON.parse(readFileSync(join(out, entries[1].run, 'record.json'), 'utf8'));
    expect(record.sessions.length).toBe(2); // resumed, not started again
    for (const e of entries) {
      const seq = temp.path(`resume-seq-${e.id}`);
      await runScenarioFile(join(out, e.scenario), { out: seq, progress: 'none', log: () => {} });
      for (const f of ['state.bin', 'final.ply']) expect(readFileSync(join(out, e.run, f)).equals(readFileSync(join(seq, f))), `${e.label} ${f}`).toBe(true);
    }
  });
});

describe('placode sweep collect', () => {
  it('one CSV row per run with its values, stability prediction and final metrics; a contact sheet on the grid', async () => {
    const out = temp.path('pool'); // from the first test: 4 done, 2 failed
    const r = await run('sweep', 'collect', out, '--thumbnail', '100');
    expect(r.code, r.err).toBe(0);
    const lines = readFileSync(join(out, 'sweep.csv'), 'utf8').trim().split('\n');
    expect(lines.length).toBe(7); // a failure's message of several lines stays on its row
    const header = csvFields(lines[0]);
    for (const c of ['index', 'id', 'state', 'mesh', 'kinetics.parameters.k', 'message', 'stop', 'band_low', 'predicted_mode', 'patches', 'final_v_mean']) expect(header).toContain(c);
    const rows = lines.slice(1).map((l) => Object.fromEntries(csvFields(l).map((v, k) => [header[k], v])));
    expect(rows.map((x) => x.state)).toEqual(['done', 'done', 'done', 'done', 'failed', 'failed']);
    expect(JSON.parse(rows[0].mesh)).toEqual({ shape: 'sphere', params: { radius: 0.25 }, vertices: 400 });
    expect(rows[4].message).toMatch(/1 problem \| line 4:13 +mesh\.file: .*broken\.ply: face 0 uses vertex 9/);
    expect(rows[0].stop).toBe('end');
    expect(Number(rows[0].final_time)).toBe(60);
    const png = PNG.sync.read(readFileSync(join(out, 'sheet.png')));
    expect(png.width).toBe(2 * 100 + 150); // k across: 2 columns
    expect(png.height).toBe(3 * (100 + 24) + 60); // the meshes down: 3 rows
  });
});

/** The fields of one CSV line (RFC 4180: quoted fields may hold commas and doubled quotes). */
function csvFields(line: string): string[] {
  return [...line.matchAll(/(?:^|,)(?:"((?:[^"]|"")*)"|([^,]*))/g)].map((m) => (m[1] !== undefined ? m[1].replace(/""/g, '"') : m[2]));
}

/** Is a Slurm controller answering here? */
function slurmUp(): boolean {
  const r = spawnSync('sinfo', ['-h', '-o', '%t'], { encoding: 'utf8', timeout: 10_000 });
  return r.status === 0 && /^(idle|mix|alloc)$/m.test(r.stdout);
}

const haveSlurm = slurmUp();
if (!haveSlurm) {
  const message = 'SKIPPED: no Slurm cluster answers here (sinfo); the job-array test needs one: run .ci/start-slurm as root after apt-get install slurm-wlm munge';
  if (process.env.PLACODE_REQUIRE_SLURM) throw new Error(message.replace('SKIPPED', 'PLACODE_REQUIRE_SLURM is set but'));
  process.stderr.write(`\n*** ${message} ***\n\n`);
}

describe.skipIf(!haveSlurm)('placode sweep slurm (a real single-node Slurm)', () => {
  it('the generated job array runs every point to completion, and collect sees every run', async () => {
    write('base.yaml', BASE);
    const sweep = write('slurm.yaml', 'scenario: base.yaml\nvary:\n  kinetics.parameters.F: [0.03, 0.04]\n  kinetics.parameters.k: [0.055, 0.062]\n');
    const out = temp.path('slurm');
    planSweep(sweep, { out, log: () => {} });
    // written only: one array over the manifest indices
    const plain = await run('sweep', 'slurm', out, '--time', '5', '--max-parallel', '2');
    expect(plain.code, plain.err).toBe(0);
    const script = readFileSync(temp.path('slurm', 'slurm', 'array.sbatch'), 'utf8');
    expect(script).toMatch(/#SBATCH --array=0-3%2/);
    expect(script).toMatch(/#SBATCH --time=5/);
    expect(script).toMatch(/sweep task .* --index "\$SLURM_ARRAY_TASK_ID"/);
    // submitted with a MaxArraySize of 3: indices 0–2 in one array, index 3 as task 0 of a second with offset 3
    const r = await run('sweep', 'slurm', out, '--time', '5', '--max-parallel', '2', '--max-array-size', '3', '--submit');
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/submitted jobs \d+, \d+/);
    expect(readFileSync(temp.path('slurm', 'slurm', 'array-1.sbatch'), 'utf8')).toMatch(/#SBATCH --array=0-2%2/);
    const second = readFileSync(temp.path('slurm', 'slurm', 'array-2.sbatch'), 'utf8');
    expect(second).toMatch(/#SBATCH --array=0%2/);
    expect(second).toMatch(/--index "\$\(\(3 \+ SLURM_ARRAY_TASK_ID\)\)"/);
    const deadline = Date.now() + 150_000;
    let counts = sweepStatus(out).counts;
    while (counts.done + counts.failed < 4 && Date.now() < deadline) {
      await new Promise((res) => setTimeout(res, 1000));
      counts = sweepStatus(out).counts;
    }
    expect(counts).toMatchObject({ done: 4, failed: 0 });
    const c = await run('sweep', 'collect', out);
    expect(c.code, c.err).toBe(0);
    const rows = readFileSync(join(out, 'sweep.csv'), 'utf8').trim().split('\n').slice(1);
    expect(rows.length).toBe(4);
    for (const row of rows) expect(row.split(',')[2]).toBe('done');
    expect(existsSync(join(out, 'sheet.png'))).toBe(true);
    // nothing left to submit
    const again = await run('sweep', 'slurm', out, '--submit');
    expect(again.code).toBe(2);
    expect(again.err).toMatch(/every run of .* is finished; nothing to submit/);
  }, 180_000);
});
