import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync, existsSync, readdirSync, copyFileSync } from 'node:fs';
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';
import { decodeState, speciesFromProperties } from '../../solver/run/runFiles.ts';
import { thresholdComponents } from '../../solver/analysis/thresholdComponents.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';


const temp = useTempFiles('placode-run-');
const scenario = temp.write;

const SMALL = `
seed: 11
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 2000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial:
  spots: {count: 3, radius: 0.05, values: {u: 0.5, v: 0.25}}
  noise: {amplitude: 0.01, species: [v]}
time: {scheme: imex, step: 1, end: 300}
output: {every: 100}
`;

/** Every file of a run directory except the record, as bytes. */
function outputs(runDir: string): Record<string, Buffer> {
  const files: Record<string, Buffer> = {};
  for (const f of ['final.ply', 'metrics.csv', 'state.bin']) files[f] = readFileSync(join(runDir, f));
  for (const f of readdirSync(join(runDir, 'frames'))) files[`frames/${f}`] = readFileSync(join(runDir, 'frames', f));
  return files;
}

describe('placode run', () => {
  it('writes record.json, frames, final.ply and metrics.csv, as documented', async () => {
    const file = scenario('small.yaml', SMALL);
    const out = temp.path('small');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.err).toMatch(/finished at t=300/);
    expect(r.code).toBe(0);
    expect(readdirSync(join(out, 'frames'))).toEqual(['0000.ply', '0001.ply', '0002.ply', '0003.ply']);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.tool.name).toBe('placode');
    expect(record.seed).toBe(11);
    expect(record.mesh.checksum).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(record.stop).toMatchObject({ reason: 'end', time: 300, step: 300 });
    expect(record.resolved.kinetics.parameters).toEqual({ F: 0.03, k: 0.062 });
    expect(record.resolved.time).toMatchObject({ scheme: 'imex', step: 1, end: 300, solver: 'cg' }); // auto: dt·D·λmax is small, CG converges fast
    const csv = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('time,step,u_min,u_mean,u_max,u_integral,v_min,v_mean,v_max,v_integral,patches,dominant_eigenvalue');
    expect(csv.length).toBe(5);
    const frame = loadMeshFile(join(out, 'frames', '0003.ply'));
    const species = speciesFromProperties(frame.vertexData);
    expect(Object.keys(species)).toEqual(['u', 'v']);
    // the last metrics row describes the last frame: ∫u dA = Σ m u, mean = ∫u/area
    const last = csv[4].split(',').map(Number);
    expect(last[0]).toBe(300);
    const saved = decodeState(readFileSync(join(out, 'state.bin')), 'state.bin');
    let vmax = -Infinity;
    for (let i = 1; i < saved.state.length; i += 2) vmax = Math.max(vmax, saved.state[i]);
    expect(last[8]).toBe(vmax);
    // frames carry the species as float32
    expect(species.v[7]).toBeCloseTo(saved.state[15], 6);
  });

  it('same scenario and seed twice gives byte-identical outputs', async () => {
    const file = temp.path('small.yaml');
    await run('run', file, '--out', temp.path('again'), '--progress', 'none');
    const a = outputs(temp.path('small')), b = outputs(temp.path('again'));
    expect(Object.keys(b)).toEqual(Object.keys(a));
    for (const k of Object.keys(a)) expect(b[k].equals(a[k]), k).toBe(true);
  });

  it('an interrupted run resumes to the same final state as an uninterrupted one', async () => {
    const out = temp.path('interrupted');
    const first = await runScenarioFile(temp.path('small.yaml'), { out, progress: 'none', interruptAfterSteps: 150, log: () => {} });
    expect(first.reason).toBe('interrupted');
    expect(JSON.parse(readFileSync(join(out, 'record.json'), 'utf8')).status).toBe('interrupted');
    expect(existsSync(join(out, 'final.ply'))).toBe(false);
    const r = await run('run', '--resume', out, '--progress', 'none');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/resuming .* from t=150/);
    const a = outputs(temp.path('small')), b = outputs(out);
    for (const k of Object.keys(a)) expect(b[k].equals(a[k]), k).toBe(true);
    const again = await run('run', '--resume', out);
    expect(again.code).toBe(2);
    expect(again.err).toMatch(/already finished/);
  });

  it('a run that watches for a steady state and is interrupted at an output stops, resumed, at the same step with the same bytes', async () => {
    // a' = 1 − a relaxes every vertex to 1: the relative change per unit time decays like e^{−t},
    // so the steady-state rule fires at one output. Interrupting at the output just before it
    // checks that the saved state carries the reference of that output, not of the one before.
    const file = scenario('relax.yaml', `
seed: 4
mesh: {shape: sphere, vertices: 300}
kinetics: {species: [a], reactions: {a: "1 - a"}}
diffusion: {a: 0.01}
initial: {values: {a: 0.5}, noise: 0.2}
time: {scheme: imex, step: 0.05, end: 40, steadyState: 0.01}
output: {every: 0.5}
`);
    const reference = await runScenarioFile(file, { out: temp.path('relax-ref'), progress: 'none', log: () => {} });
    expect(reference.reason).toBe('steady-state');
    const every = 10;
    expect(reference.step % every).toBe(0);
    const out = temp.path('relax-int');
    const first = await runScenarioFile(file, { out, progress: 'none', interruptAfterSteps: reference.step - every, log: () => {} });
    expect(first).toMatchObject({ reason: 'interrupted', step: reference.step - every });
    const r = await run('run', '--resume', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    expect(JSON.parse(readFileSync(join(out, 'record.json'), 'utf8')).stop).toMatchObject({ reason: 'steady-state', step: reference.step });
    const a = outputs(temp.path('relax-ref')), b = outputs(out);
    for (const k of Object.keys(a)) expect(b[k].equals(a[k]), k).toBe(true);
  });

  it('Ctrl-C (SIGINT) stops a real process with its state saved; --resume finishes it identically', async () => {
    const longer = scenario('longer.yaml', SMALL.replace('end: 300', 'end: 15000').replace('every: 100', 'every: 5000'));
    const reference = temp.path('longer-ref');
    expect((await run('run', longer, '--out', reference, '--progress', 'none')).code).toBe(0);
    const out = temp.path('longer-int');
    const bin = join(__dirname, '..', '..', 'solver', 'cli', 'placode.mjs');
    const child = spawn(process.execPath, [bin, 'run', longer, '--out', out, '--progress', 'lines'], { stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    let signalled = false;
    child.stderr.on('data', (d) => {
      err += String(d);
      // the first progress line says stepping has begun: interrupt then, once
      if (!signalled && /^ {2}t=/m.test(err)) {
        signalled = true;
        child.kill('SIGINT');
      }
    });
    const code = await new Promise<number | null>((res) => child.on('exit', res));
    expect(code, err).toBe(130); // (if 0: the run finished before the signal; lengthen it)
    expect(err).toMatch(/interrupted at t=.*placode run --resume/s);
    expect((await run('run', '--resume', out, '--progress', 'none')).code).toBe(0);
    const a = outputs(reference), b = outputs(out);
    for (const k of Object.keys(a)) expect(b[k].equals(a[k]), k).toBe(true);
  }, 60_000);

  it('reads a parameter from per-vertex mesh data, seeds spots at points and vertices, and starts from a previous run', async () => {
    // a mesh file carrying a per-vertex feed rate, as a measured morphogen map would
    const { buildShape } = await import('../../meshes/shapes/index.ts');
    const { saveMeshFile } = await import('../../solver/io/meshFiles.ts');
    const { mesh } = buildShape({ shape: 'sphere', params: { radius: 0.25 }, vertices: 1000 });
    const n = mesh.positions.length / 3;
    const feed = new Float64Array(n);
    for (let i = 0; i < n; i++) feed[i] = 0.03 + 0.02 * (mesh.positions[3 * i + 2] > 0 ? 1 : 0);
    saveMeshFile(temp.path('fed.ply'), mesh, { properties: { feed } });
    const file = scenario('fed.yaml', `
mesh: {file: fed.ply}
kinetics: {model: gray-scott, parameters: {F: {vertexData: feed}}}
diffusion: {u: 0, v: 0}
initial:
  values: {u: 0.5, v: 0}
  spots: {centres: [[0, 0, 0.25]], radius: 0.05, values: {v: 0.25}}
time: {scheme: explicit, step: 1, end: 10}
output: {every: 10}
`);
    expect((await run('run', file, '--out', temp.path('fed'), '--progress', 'none')).code).toBe(0);
    const first = speciesFromProperties(loadMeshFile(temp.path('fed', 'frames', '0000.ply')).vertexData);
    // the spot sits at the north pole: v = 0.25 within 0.05 of (0, 0, 0.25), 0 elsewhere
    const p = mesh.positions;
    for (let i = 0; i < n; i++) {
      const inside = p[3 * i] ** 2 + p[3 * i + 1] ** 2 + (p[3 * i + 2] - 0.25) ** 2 <= 0.05 ** 2 + 1e-12;
      expect(first.v[i]).toBe(inside ? 0.25 : 0);
      expect(first.u[i]).toBe(0.5);
    }
    // the per-vertex feed acts: where v = 0 and nothing diffuses, u' = F(1 − u), and ten forward
    // Euler steps of 1 give 1 − u = 0.5·(1 − F)¹⁰ with each vertex's own F
    const after = decodeState(readFileSync(temp.path('fed', 'state.bin')), 'fed');
    let checked = 0;
    for (let i = 0; i < n; i++) {
      if (first.v[i] !== 0) continue;
      expect(1 - after.state[2 * i]).toBeCloseTo(0.5 * (1 - Math.fround(feed[i])) ** 10, 12); // PLY stores float32
      checked++;
    }
    expect(checked).toBeGreaterThan(n / 2);
    const record = JSON.parse(readFileSync(temp.path('fed', 'record.json'), 'utf8'));
    expect(record.resolved.kinetics.parameters.F).toEqual({ vertexData: 'feed' });
    // continue from that run's final state, adding spots at given vertices
    const next = scenario('next.yaml', `
mesh: {file: fed.ply}
kinetics: {model: gray-scott, parameters: {F: {vertexData: feed}}}
initial:
  from: fed
  spots: {vertices: [0, 5], radius: 0.001, values: {u: 0.5}}
time: {scheme: explicit, end: 10}
`);
    expect((await run('run', next, '--out', temp.path('next'), '--progress', 'none')).code).toBe(0);
    const prev = decodeState(readFileSync(temp.path('fed', 'state.bin')), 'fed');
    const start = speciesFromProperties(loadMeshFile(temp.path('next', 'frames', '0000.ply')).vertexData);
    for (let i = 0; i < n; i++) {
      expect(start.v[i]).toBeCloseTo(prev.state[2 * i + 1], 6); // float32 frame of the float64 state
      expect(start.u[i]).toBeCloseTo(i === 0 || i === 5 ? 0.5 : prev.state[2 * i], 6);
    }
  });

  it('refuses to overwrite a run directory without --force', async () => {
    const r = await run('run', temp.path('small.yaml'), '--out', temp.path('small'));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/already holds files; choose a new --out, add --force/);
  });

  it('Gray–Scott with Pearson\'s D_u = 2e-5, D_v = 1e-5 forms separated spots on a sphere (Pearson, Science 1993)', async () => {
    // F = 0.03, k = 0.062 lies in the region where Pearson reports self-replicating spots
    // (his Fig. 2; the exact region boundaries are quoted from memory). Sphere of radius
    // 0.25: area 0.785, about an eighth of Pearson's 2.5 × 2.5 square.
    const file = scenario('spots.yaml', `
seed: 3
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 5000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 4, radius: 0.04, values: {u: 0.5, v: 0.25}}}
time: {scheme: explicit, end: 6000}
output: {every: 1000, frames: false}
`);
    const out = temp.path('spots');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const final = loadMeshFile(join(out, 'final.ply'));
    const v = speciesFromProperties(final.vertexData).v;
    const c = thresholdComponents(final.mesh, v);
    const area = meshArea(final.mesh);
    // the four seeds have replicated into many spots …
    expect(c.patches.length).toBeGreaterThanOrEqual(20);
    // … each a small, compact patch (a spot, not a stripe or a covering) …
    for (const p of c.patches) expect(p.area).toBeLessThan(0.02 * area);
    // … of similar size (self-replicating spots share one size)
    const areas = c.patches.map((p) => p.area).sort((x, y) => x - y);
    expect(areas[areas.length - 1] / areas[Math.floor(areas.length / 2)]).toBeLessThan(2);
  });

  it('a blow-up stops with the time and species named and keeps the last good state', async () => {
    const file = scenario('blowup.yaml', `
mesh: {shape: sphere, vertices: 200}
kinetics: {species: [a], reactions: {a: "a^2"}}
diffusion: {a: 0.01}
initial: {values: {a: "1 + 0.1*z"}}
time: {scheme: explicit, step: 0.01, end: 5}
`);
    const out = temp.path('blowup');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code).toBe(3);
    expect(r.err).toMatch(/blow-up at t=[0-9.]+ \(step \d+\): a became (Infinity|NaN) at vertex \d+/);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.stop.reason).toBe('blow-up');
    const saved = decodeState(readFileSync(join(out, 'state.bin')), 'state.bin');
    expect(saved.state.every(Number.isFinite)).toBe(true);
    expect(saved.step).toBe(record.stop.step);
    expect(existsSync(join(out, 'final.ply'))).toBe(true);
  });

  it('a run that stays homogeneous reports 0 patches and no events, at its noisy start and as the noise decays', async () => {
    // Schnakenberg a = 0.1, b = 0.9, d = 10, γ = 1: the dispersion relation (Murray 2003, Mathematical
    // Biology II, ch. 2) gives the unstable band 0.2 < k² < 0.5, and the unit sphere's first nonzero eigenvalue is 2 (l(l+1), l = 1):
    // no mode is unstable, so the 1 % noise decays to the uniform state (u, v) = (a + b, b/(a + b)²) = (1, 0.9).
    const file = scenario('homogeneous.yaml', `
mesh: {shape: sphere, vertices: 500}
kinetics: {model: schnakenberg, parameters: {gamma: 1}}
initial: {noise: 0.01}
time: {step: 0.01, end: 20}
output: {every: 2, frames: false}
`);
    const out = temp.path('homogeneous');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const frames = record.analysis.frames as { contrast: number; floor: number; patches: unknown[] }[];
    expect(frames.length).toBe(11);
    // the starting noise spans about 2 × 0.01; the floor is 4 × 0.01
    expect(frames[0].contrast).toBeGreaterThan(0.015);
    expect(frames[0].floor).toBeCloseTo(0.04, 12);
    expect(frames[frames.length - 1].contrast).toBeLessThan(1e-4);
    for (const f of frames) expect(f.patches).toEqual([]);
    expect(record.analysis.events).toEqual([]);
    expect(record.analysis.floorRule).toMatch(/contrast \(max − min\) above 0\.04/);
  });

  it('a spectrum that cannot reach the unstable band is named in a warning that says what to do', async () => {
    const file = scenario('short-spectrum.yaml', `
mesh: {shape: sphere, vertices: 300}
kinetics: {model: schnakenberg, parameters: {gamma: 1000}}
initial: {noise: 0.01}
time: {step: 0.0001, end: 0.001}
output: {every: 0.001, frames: false}
`);
    const out = temp.path('short-spectrum');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code).toBe(0);
    // band 200 < k² < 500 (γ × the γ = 1 band); covering it on the unit sphere takes 1.25·500 + 12 = 637
    // modes (Weyl's law with the margin), more than a 252-vertex mesh has
    expect(r.err).toMatch(/warning: the unstable band reaches k² = 500\.0; the 251 surface modes computed reach λ = [0-9.]+ \(covering the band takes about 6\d\d, more than a mesh of 252 vertices has\)[^\n]*refine the mesh/);
    expect(r.err.match(/unstable band reaches/g)).toHaveLength(1);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.analysis.modesUpTo).toBeLessThan(500);
    expect(record.warnings.some((w: string) => /refine the mesh/.test(w))).toBe(true);
    const rows = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\n');
    const col = rows[0].split(',').indexOf('patches');
    for (const row of rows.slice(1)) expect(row.split(',')[col]).toBe('0');
  });

  it('a steady state that varies over the surface is not a pattern: its noisy start has no patches', async () => {
    // Gierer–Meinhardt with a source a that grows along x: the steady state (u*, v*) varies over the
    // paddle, and the 1 % noise on u sits on that gradient
    const file = scenario('gradient.yaml', `
seed: 5
mesh: {shape: limb-bud, vertices: 1500}
kinetics: {model: gierer-meinhardt, parameters: {gamma: 250, a: "0.05 + 0.05*x/3", b: 1, kappa: 0.1, d: 30}}
initial: {values: steady, noise: {amplitude: 0.01, species: [u]}}
time: {scheme: imex, step: 0.0004, end: 0.0004}
output: {every: 0.0004, frames: false}
analysis: {modes: 0}
`);
    const out = temp.path('gradient');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const u = speciesFromProperties(loadMeshFile(join(out, 'final.ply')).vertexData).u;
    // the raw field spans more than the floor (the gradient of u* and the noise) …
    expect(Math.max(...u) - Math.min(...u)).toBeGreaterThan(0.045);
    // … but its departure from the steady state is the noise: about 2 × 0.01, under the floor 4 × 0.01
    const f0 = record.analysis.frames[0];
    expect(f0.contrast).toBeGreaterThan(0.015);
    expect(f0.contrast).toBeLessThan(0.04);
    expect(f0.patches).toEqual([]);
  });

  it('events begin at the first frame that holds a pattern, not with the noise it grew from; the spectrum reaches the unstable band', async () => {
    // the same model at γ = 200 puts the l = 6…9 clusters of the unit sphere (k² = l(l+1) from 42 to 90)
    // inside the band γ·(0.2, 0.5) = (40, 100): the noise grows into spots
    const file = scenario('from-noise.yaml', `
seed: 5
mesh: {shape: sphere, vertices: 2000}
kinetics: {model: schnakenberg, parameters: {gamma: 200}}
initial: {noise: 0.01}
time: {scheme: imex, step: 0.001, end: 2}
output: {every: 0.25, frames: false}
`);
    const out = temp.path('from-noise');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const frames = record.analysis.frames as { time: number; patches: unknown[] }[];
    const first = frames.findIndex((f) => f.patches.length > 0);
    expect(frames[0].patches).toEqual([]);
    expect(first).toBeGreaterThan(0);
    expect(frames[frames.length - 1].patches.length).toBeGreaterThan(5);
    for (const e of record.analysis.events as { time: number }[]) expect(e.time).toBeGreaterThan(frames[first].time);
    // the default 40 modes end near λ = 30 here; the run computes enough to pass the band's upper edge, 100
    expect(record.analysis.modesUpTo).toBeGreaterThan(100);
    expect(record.warnings.join('\n')).not.toMatch(/unstable band reaches/);
    // the pattern's dominant cluster is the predicted one, l = 8 (72 on the exact sphere; the P1
    // eigenvalues of a 2000-vertex sphere lie a few per cent below, O(h²))
    const predicted = record.analysis.prediction.predicted;
    expect(predicted.multiplicity).toBe(17);
    expect(Math.abs(predicted.eigenvalue - 72) / 72).toBeLessThan(0.05);
    expect((frames[frames.length - 1] as { dominantEigenvalue?: number }).dominantEigenvalue).toBeCloseTo(predicted.eigenvalue, 9);
  });

  it('stops at steady state when asked', async () => {
    const file = scenario('steady.yaml', `
mesh: {shape: sphere, vertices: 500}
kinetics: {model: schnakenberg, parameters: {gamma: 1}}
initial: {noise: 0.01}
time: {step: 0.01, end: 1000, steadyState: 1e-6}
output: {every: 5, frames: false}
`);
    const out = temp.path('steady');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/steady state at t=/);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.stop.reason).toBe('steady-state');
    expect(record.stop.time).toBeLessThan(1000);
  });
});

describe('bad scenarios each get their own clear error', () => {
  const cases: [string, string, RegExp][] = [
    ['unknown model', 'mesh: {shape: sphere}\nkinetics: {model: grey-scott}\ntime: {end: 1}\n', /line 2:\d+ +kinetics\.model: unknown model "grey-scott" \(did you mean "gray-scott"\?\)/],
    ['wrong type', 'mesh: {shape: sphere}\nkinetics: {model: gray-scott}\ntime: {end: "soon"}\n', /time\.end: must be a number, got text "soon"/],
    ['negative diffusion', 'mesh: {shape: sphere, vertices: 100}\nkinetics: {model: gray-scott}\ndiffusion: {u: -1}\ntime: {end: 1}\n', /diffusion\.u: diffusion of u must be ≥ 0, got -1/],
    ['negative diffusion field', 'mesh: {shape: sphere, vertices: 100}\nkinetics: {model: gray-scott}\ndiffusion: {v: "z"}\ntime: {end: 1}\n', /diffusion\.v: diffusion of v must be ≥ 0 everywhere; it is -?[0-9.e-]+ at vertex \d+/],
    ['malformed formula', 'mesh: {shape: sphere}\nkinetics: {species: [a], reactions: {a: "a*(1 - a"}}\ntime: {end: 1, step: 0.1}\n', /kinetics\.reactions\.a: in "a\*\(1 - a" at column 10: cannot parse: Parenthesis \) expected/],
    ['unsafe formula', 'mesh: {shape: sphere}\nkinetics: {species: [a], reactions: {a: "a.constructor"}}\ntime: {end: 1, step: 0.1}\n', /kinetics\.reactions\.a: in "a\.constructor" at column 1: property or index access "a\.constructor" is not allowed/],
    ['unknown symbol', 'mesh: {shape: sphere}\nkinetics: {species: [a], reactions: {a: "a*r"}}\ntime: {end: 1, step: 0.1}\n', /kinetics\.reactions\.a: in "a\*r" at column 3: unknown name "r"; allowed names: a, t, x, y, z/],
    ['missing mesh file', 'mesh: {file: nowhere.ply}\nkinetics: {model: gray-scott}\ntime: {end: 1}\n', /mesh\.file: .*nowhere\.ply.*no such mesh file/],
    ['unknown shape', 'mesh: {shape: sphear}\nkinetics: {model: gray-scott}\ntime: {end: 1}\n', /mesh\.shape: unknown shape "sphear"/],
    ['unknown key', 'mesh: {shape: sphere}\nkinetics: {model: gray-scott}\ntime: {end: 1, stp: 2}\n', /time\.stp: unknown key \(did you mean "step"\?\)/],
    ['unknown parameter', 'mesh: {shape: sphere}\nkinetics: {model: gray-scott, parameters: {f: 0.03}}\ntime: {end: 1}\n', /kinetics\.parameters\.f: Gray–Scott has no parameter "f" \(did you mean "F"\?\)/],
    ['missing section', 'mesh: {shape: sphere}\nkinetics: {model: gray-scott}\n', /\(top level\): missing "time"/],
    ['not YAML', 'mesh: [sphere\nkinetics: 1\n', /not valid YAML/],
    ['explicit step too large', 'mesh: {shape: sphere, vertices: 3000}\nkinetics: {model: schnakenberg}\ntime: {scheme: explicit, step: 0.1, end: 1}\n', /time\.step: 0\.1 is above the explicit scheme's stability limit/],
    ['no steady state for own kinetics', 'mesh: {shape: sphere, vertices: 100}\nkinetics: {species: [a], reactions: {a: "1 - a"}}\ndiffusion: {a: 1}\ntime: {end: 1, step: 0.1}\n', /initial\.values: your own kinetics has no closed-form steady state/],
    ['unknown vertex data', 'mesh: {shape: sphere, vertices: 100}\nkinetics: {model: gray-scott, parameters: {F: {vertexData: feed}}}\ntime: {end: 1}\n', /kinetics\.parameters\.F: the mesh has no per-vertex value "feed"/],
  ];
  for (const [what, text, pattern] of cases) {
    it(what, async () => {
      const file = scenario(`bad-${what.replace(/\W+/g, '-')}.yaml`, text);
      const r = await run('run', file, '--out', temp.path('never'));
      expect(r.code, r.err).toBe(1);
      expect(r.err).toMatch(pattern);
      expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
      expect(existsSync(temp.path('never'))).toBe(false);
    });
  }
});

describe('shipped example scenarios', () => {
  const examples = join(__dirname, '..', '..', 'meshes', 'examples');
  for (const name of readdirSync(examples).filter((f) => /\.ya?ml$/.test(f) && !/-sweep\.ya?ml$/.test(f))) {
    it(`${name} checks cleanly and runs its first frames`, async () => {
      const r = await run('run', join(examples, name), '--check');
      expect(r.code, r.err).toBe(0);
      const plan = JSON.parse(r.out);
      expect(plan.warnings).toEqual([]);
      // a short run of the same scenario: copy it with an early end
      const short = temp.path(`short-${name}`);
      copyFileSync(join(examples, name), short);
      writeFileSync(short, readFileSync(short, 'utf8').replace(/\n  end: [0-9.e+]+/, `\n  end: ${2 * plan.time.step}`).replace(/mesh:\n/, 'mesh:\n').replace(/file: /g, `file: ${examples}/`));
      const ran = await run('run', short, '--out', temp.path(`ran-${name}`), '--progress', 'none');
      expect(ran.code, ran.err).toBe(0);
    });
  }
});
