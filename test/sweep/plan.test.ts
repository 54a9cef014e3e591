import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { expandSweep, applySweepPoint, axisValues } from '../../solver/sweep/expandSweep.ts';
import { planSweep } from '../../solver/sweep/sweepPlan.ts';
import { arraySpec, arrayChunks } from '../../solver/sweep/sweepSlurm.ts';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';

const temp = useTempFiles('placode-sweep-plan-');
const write = temp.write;

const BASE = `
seed: 3
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 300}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
time: {scheme: imex, step: 1, end: 20}
output: {every: 10}
`;

describe('sweep expansion', () => {
  it('a grid is the Cartesian product of its axes, first axis slowest, each combination once', () => {
    const points = expandSweep({ vary: { a: [1, 2, 3], b: { from: 0, to: 1, steps: 5 }, c: ['x', 'y'] } });
    expect(points.length).toBe(3 * 5 * 2);
    const keys = new Set(points.map((p) => JSON.stringify([p.a, p.b, p.c])));
    expect(keys.size).toBe(30);
    for (const a of [1, 2, 3]) for (const b of [0, 0.25, 0.5, 0.75, 1]) for (const c of ['x', 'y']) expect(keys.has(JSON.stringify([a, b, c]))).toBe(true);
    expect(points.slice(0, 3)).toEqual([{ a: 1, b: 0, c: 'x' }, { a: 1, b: 0, c: 'y' }, { a: 1, b: 0.25, c: 'x' }]);
  });

  it('a log range is geometric and a linear range is evenly spaced, both ending exactly at from and to', () => {
    const log = axisValues({ from: 1e-5, to: 1e-1, steps: 5, scale: 'log' }) as number[];
    expect(log[0]).toBe(1e-5);
    expect(log[4]).toBe(0.1);
    for (let i = 1; i < 5; i++) expect(log[i] / log[i - 1]).toBeCloseTo(10, 9);
    expect(axisValues({ from: 0.055, to: 0.064, steps: 4 })).toEqual([0.055, 0.058, 0.061, 0.064]); // 12-digit tidy: no 0.058000000000000003
    expect(axisValues({ from: 1000, to: 4000, steps: 3, integer: true })).toEqual([1000, 2500, 4000]);
  });

  it('a Latin hypercube puts exactly one sample in each of the n strata of every axis (McKay, Beckman & Conover 1979)', () => {
    const n = 16;
    const points = expandSweep({ design: 'latin-hypercube', samples: n, seed: 9, vary: { F: { from: 0.01, to: 0.05 }, D: { from: 1e-3, to: 1e-1, scale: 'log' } } });
    expect(points.length).toBe(n);
    const strata = (values: number[], q: (v: number) => number) => new Set(values.map((v) => Math.floor(q(v) * n)));
    expect(strata(points.map((p) => p.F as number), (v) => (v - 0.01) / 0.04).size).toBe(n);
    expect(strata(points.map((p) => p.D as number), (v) => (Math.log(v) - Math.log(1e-3)) / (Math.log(1e-1) - Math.log(1e-3))).size).toBe(n);
    // the same seed draws the same points; another seed other points
    expect(expandSweep({ design: 'latin-hypercube', samples: n, seed: 9, vary: { F: { from: 0.01, to: 0.05 }, D: { from: 1e-3, to: 1e-1, scale: 'log' } } })).toEqual(points);
    expect(expandSweep({ design: 'latin-hypercube', samples: n, seed: 10, vary: { F: { from: 0.01, to: 0.05 }, D: { from: 1e-3, to: 1e-1, scale: 'log' } } })).not.toEqual(points);
  });

  it('setting a path creates missing mappings, indexes lists, and refuses to reach inside a number', () => {
    const base = { kinetics: { model: 'gray-scott' }, growth: { rates: [0.1, 0.2, 0.3] } };
    const out = applySweepPoint(base, { 'kinetics.parameters.F': 0.04, 'growth.rates.1': 0.5 });
    expect(out).toEqual({ kinetics: { model: 'gray-scott', parameters: { F: 0.04 } }, growth: { rates: [0.1, 0.5, 0.3] } });
    expect(base.growth.rates[1]).toBe(0.2); // the base is not changed
    expect(() => applySweepPoint(base, { 'kinetics.model.x': 1 })).toThrow(/kinetics\.model is "gray-scott".*not a mapping/);
  });

  it('Slurm array indices are written as ranges', () => {
    expect(arraySpec([0, 1, 2, 3, 7, 9, 10, 11, 12])).toBe('0-3,7,9-12');
    expect(arraySpec([5])).toBe('5');
    // task ids stay below MaxArraySize: indices 0–9 (3 and 4 finished) with a limit of 4
    expect(arrayChunks([0, 1, 2, 5, 6, 7, 8, 9], 4)).toEqual([{ offset: 0, ids: [0, 1, 2] }, { offset: 4, ids: [1, 2, 3] }, { offset: 8, ids: [0, 1] }]);
  });
});

describe('placode sweep plan', () => {
  it('writes one manifest line per run, a scenario for each, and the same bytes when planned again', () => {
    write('base.yaml', BASE);
    const sweep = write('fk.yaml', `scenario: base.yaml\nvary:\n  kinetics.parameters.F: [0.02, 0.03, 0.04]\n  kinetics.parameters.k: {from: 0.05, to: 0.06, steps: 2}\n`);
    const a = planSweep(sweep, { out: temp.path('plan-a'), log: () => {} });
    const b = planSweep(sweep, { out: temp.path('plan-b'), log: () => {} });
    const manifest = readFileSync(temp.path('plan-a', 'manifest.jsonl'), 'utf8');
    expect(manifest).toBe(readFileSync(temp.path('plan-b', 'manifest.jsonl'), 'utf8'));
    expect(a.entries.length).toBe(6);
    expect(new Set(a.entries.map((e) => e.id)).size).toBe(6);
    expect(b.entries.map((e) => e.values)).toEqual(a.entries.map((e) => e.values));
    const first = JSON.parse(readFileSync(temp.path('plan-a', a.entries[0].scenario), 'utf8'));
    expect(first.kinetics.parameters).toEqual({ F: 0.02, k: 0.05 });
    expect(first.mesh).toEqual({ shape: 'sphere', params: { radius: 0.25 }, vertices: 300 });
    // ids name the scenario, not the position: extending the grid keeps the old ids
    const wider = write('fk2.yaml', `scenario: base.yaml\nvary:\n  kinetics.parameters.F: [0.01, 0.02, 0.03, 0.04]\n  kinetics.parameters.k: {from: 0.05, to: 0.06, steps: 2}\n`);
    const c = planSweep(wider, { out: temp.path('plan-a'), force: true, log: () => {} });
    const ids = new Set(c.entries.map((e) => e.id));
    for (const e of a.entries) expect(ids.has(e.id)).toBe(true);
  });

  it('whole mappings are values too: a sweep over shapes, each with its own parameters', () => {
    write('base.yaml', BASE);
    const sweep = write('shapes.yaml', `scenario: base.yaml
vary:
  mesh:
    - {shape: sphere, params: {radius: 0.25}, vertices: 300}
    - {shape: torus, params: {R: 0.3, r: 0.1}, vertices: 300}
    - {shape: capsule, params: {r: 0.15, L: 0.4}, vertices: 300}
  kinetics.parameters.F: [0.03, 0.04]
`);
    const p = planSweep(sweep, { out: temp.path('shapes'), log: () => {} });
    expect(p.entries.map((e) => e.label)).toEqual(['mesh=sphere F=0.03', 'mesh=sphere F=0.04', 'mesh=torus F=0.03', 'mesh=torus F=0.04', 'mesh=capsule F=0.03', 'mesh=capsule F=0.04']);
    const torus = JSON.parse(readFileSync(temp.path('shapes', p.entries[2].scenario), 'utf8'));
    expect(torus.mesh).toEqual({ shape: 'torus', params: { R: 0.3, r: 0.1 }, vertices: 300 });
    expect(torus.kinetics.parameters).toEqual({ F: 0.03, k: 0.062 });
  });

  it('a scenario with a sweep section is a sweep of itself; mesh files are re-pointed from the scenario directories', async () => {
    const r1 = await run('mesh', 'sphere', '--vertices', '300', '-o', temp.path('ball.ply'));
    expect(r1.code).toBe(0);
    const file = write('self.yaml', BASE.replace('mesh: {shape: sphere, params: {radius: 0.25}, vertices: 300}', 'mesh: {file: ball.ply}') + 'sweep:\n  vary:\n    kinetics.parameters.k: [0.055, 0.06]\n');
    const p = planSweep(file, { out: temp.path('self'), log: () => {} });
    expect(p.entries.length).toBe(2);
    const sc = JSON.parse(readFileSync(temp.path('self', p.entries[1].scenario), 'utf8'));
    expect(sc.mesh.file).toBe('../../ball.ply');
    expect(sc.sweep).toBeUndefined();
    // run: the sweep section is reported, and the scenario runs as written
    const check = await run('run', file, '--check');
    expect(check.code).toBe(0);
    expect(check.out).toMatch(/sweep section is not used by a single run/);
  });

  it('the shipped example sweep plans its 3 × 4 grid, and run refuses it as a scenario', async () => {
    const example = join(__dirname, '..', '..', 'meshes', 'examples', 'sphere-spots-sweep.yaml');
    const p = planSweep(example, { out: temp.path('example'), log: () => {} });
    expect(p.entries.length).toBe(12);
    expect(p.plan.varying).toEqual(['kinetics.parameters.F', 'kinetics.parameters.k']);
    const r = await run('run', example, '--check');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/is a sweep file .* placode sweep plan/);
  });

  it('mistakes are found before any run starts, each with its place', async () => {
    write('base.yaml', BASE);
    const cases: [string, RegExp][] = [
      ['scenario: base.yaml\nvary:\n  kinetics.parameters.F: {from: 0.01, to: 0.05}\n', /line 3.*needs steps/],
      ['scenario: base.yaml\nvary:\n  diffusion.v: {from: 0, to: 1, steps: 3, scale: log}\n', /log range needs from and to above 0/],
      ['scenario: base.yaml\ndesign: random\nvary:\n  kinetics.parameters.F: {from: 0.01, to: 0.05}\n', /needs samples/],
      ['scenario: base.yaml\nvary:\n  kinetics.parameters.Fx: [0.01]\n', /Fx/],
      ['scenario: base.yaml\nvary:\n  time.end: [10, -5]\n', /point 1 \(end=-5\)/],
      ['scenario: base.yaml\nvary:\n  kinetics.model.F: [1]\n', /kinetics\.model is "gray-scott"/],
      ['scenario: missing.yaml\nvary:\n  time.end: [10]\n', /missing\.yaml: no such scenario file/],
      ['scenario: base.yaml\nvaryy:\n  time.end: [10]\n', /unknown key \(did you mean "vary"\?\)/],
      // every point's formulas are checked, not only the first's, and every point's files must exist
      ['scenario: base.yaml\nvary:\n  kinetics.parameters.F: [0.03, "0.03 + bogus"]\n', /point 1 \(F=0\.03 \+ bogus\) kinetics\.parameters\.F: .*unknown name "bogus"/],
      ['scenario: base.yaml\nvary:\n  mesh: [{shape: sphere, vertices: 300}, {file: nowhere.ply}]\n', /point 1 .* mesh\.file: no such file .*nowhere\.ply/],
    ];
    for (const [k, [text, message]] of cases.entries()) {
      const f = write(`bad-${k}.yaml`, text);
      const r = await run('sweep', 'plan', f, '--out', temp.path(`bad-${k}`));
      expect(r.code, text).not.toBe(0);
      expect(r.err, text).toMatch(message);
      expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
    }
    // a planned directory is not overwritten without --force
    const ok = write('ok.yaml', 'scenario: base.yaml\nvary:\n  time.end: [10, 20]\n');
    expect((await run('sweep', 'plan', ok, '--out', temp.path('ok'))).code).toBe(0);
    const again = await run('sweep', 'plan', ok, '--out', temp.path('ok'));
    expect(again.code).toBe(2);
    expect(again.err).toMatch(/already holds a planned sweep; add --force/);
  });
});
