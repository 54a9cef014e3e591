import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';
import { compileKinetics, type CompiledKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper, type StepperOptions } from '../../solver/integrate/ReactionDiffusionStepper.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { nodeThreadTeam } from '../../solver/run/nodeThreads.ts';
import type { ThreadTeam } from '../../solver/integrate/ThreadTeam.ts';
import { resumeRun, runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { resolveScenarioText } from '../../solver/scenario/resolveScenarioText.ts';
import { RunEngine } from '../../solver/run/RunEngine.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';

const temp = useTempFiles('placode-threads-');
const teams: ThreadTeam[] = [];
afterAll(() => teams.forEach((t) => t.dispose()));
/** a team whose members take even one block of rows, so small meshes are split among them */
async function team(size: number): Promise<ThreadTeam | undefined> {
  const t = await nodeThreadTeam(size, 1);
  if (t) teams.push(t);
  return t;
}

/** A disc fanned around a centre with 14 neighbours: its row overflows the ELL width of 8. */
function fan(): Mesh {
  const rim = 14, p = [0, 0, 0.1];
  for (let k = 0; k < rim; k++) p.push(Math.cos((2 * Math.PI * k) / rim), Math.sin((2 * Math.PI * k) / rim), 0);
  for (let k = 0; k < rim; k++) p.push(2 * Math.cos((2 * Math.PI * (k + 0.5)) / rim), 2 * Math.sin((2 * Math.PI * (k + 0.5)) / rim), 0.2);
  const t: number[] = [];
  for (let k = 0; k < rim; k++) {
    const a = 1 + k, b = 1 + ((k + 1) % rim), o = 1 + rim + k;
    t.push(0, a, b, a, o, b);
  }
  return makeMesh(Float64Array.from(p), Uint32Array.from(t));
}

const kinetics2 = compileKinetics(['u', 'v'], { u: '-u*v^2 + F*(1 - u) + 0.01*z', v: 'u*v^2 - (F + k)*v + 0.001*sin(t)' }, ['F', 'k']);
const kinetics3 = compileKinetics(['a', 'b', 'c'], { a: 'exp(-a)*b - a + 0.1*x', b: 'a - b*c + atan2(y, 1 + a)', c: 'pow(abs(a), 1.5) - c + min(b, 0.7)' }, []);

/** One forward-Euler step computed plainly from the CSR stiffness: u + dt·f(u) − dt·D·(M⁻¹K u). */
function referenceExplicit(mesh: Mesh, k: CompiledKinetics, params: number[], diffusion: (number | Float64Array)[], u: Float64Array, dt: number, t: number): Float64Array {
  const n = mesh.positions.length / 3, nS = k.species.length;
  const K = cotanStiffness(mesh), m = lumpedMass(mesh);
  const out = new Float64Array(u.length), f = new Float64Array(nS);
  for (let i = 0; i < n; i++) {
    const p = mesh.positions;
    k.evaluate(u.subarray(i * nS, i * nS + nS), params, f, p[3 * i], p[3 * i + 1], p[3 * i + 2], t);
    for (let s = 0; s < nS; s++) {
      let a = 0;
      for (let q = K.rowOffsets[i]; q < K.rowOffsets[i + 1]; q++) a += K.values[q] * u[K.columns[q] * nS + s];
      const d = diffusion[s] as number;
      out[i * nS + s] = u[i * nS + s] + dt * f[s] - dt * d * (a / m[i]);
    }
  }
  return out;
}

function start(mesh: Mesh, nS: number): Float64Array {
  const n = mesh.positions.length / 3, u = new Float64Array(n * nS);
  for (let i = 0; i < n; i++) for (let s = 0; s < nS; s++) u[i * nS + s] = 0.5 + 0.3 * Math.sin(3 * mesh.positions[3 * i + (s % 3)] + s);
  return u;
}

describe('generated WebAssembly kernels', () => {
  it('the explicit step equals a plain evaluation from the CSR stiffness (fields of x, y, z, t, Math functions, a row longer than the ELL width)', () => {
    for (const mesh of [icosphere(6, 1), fan()]) {
      for (const [k, params, diffusion] of [[kinetics2, [0.037, 0.06], [2e-3, 1e-3]], [kinetics3, [], [1e-3, 0, 2e-3]]] as [typeof kinetics2, number[], number[]][]) {
        const nS = k.species.length, u = start(mesh, nS), dt = 0.01;
        const st = new ReactionDiffusionStepper({ mesh, kinetics: k, parameters: params, diffusion: diffusion }, { scheme: 'explicit', dt });
        st.setState(u);
        expect(st.step(0.3)).toBe(true);
        const ref = referenceExplicit(mesh, k, params, diffusion, u, dt, 0.3);
        // the same operations, the neighbour sums in another order: apart by a few roundings of values ~1
        for (let q = 0; q < ref.length; q++) expect(Math.abs(st.state[q] - ref[q]), `${mesh.positions.length / 3} vertices, ${nS} species, value ${q}`).toBeLessThan(1e-14);
      }
    }
  });

  it('the implicit–explicit step with conjugate gradients agrees with the one with Cholesky factors to the CG tolerance', () => {
    const mesh = icosphere(10, 1);
    const field = new Float64Array(mesh.positions.length / 3).map((_, i) => 0.02 * (1.5 + mesh.positions[3 * i]));
    const system = { mesh, kinetics: kinetics3, parameters: [], diffusion: [0.01, 0, field] };
    const a = new ReactionDiffusionStepper(system, { scheme: 'imex', dt: 0.1, tolerance: 1e-12 });
    const b = new ReactionDiffusionStepper(system, { scheme: 'imex', dt: 0.1, solver: 'cholesky' });
    a.setState(start(mesh, 3));
    b.setState(start(mesh, 3));
    for (let s = 0; s < 5; s++) { a.step(0.1 * s); b.step(0.1 * s); }
    for (let q = 0; q < a.state.length; q++) expect(Math.abs(a.state[q] - b.state[q])).toBeLessThan(1e-9);
  });
});

describe('the geometry kernel of a moving surface', () => {
  /** positions moved by a smooth, non-affine map */
  const moved = (mesh: Mesh) => mesh.positions.map((x, q) => x * (1.1 + 0.05 * Math.sin(3 * mesh.positions[q - (q % 3)] + (q % 3))));

  it('carries U by m(old)/m(new) and steps as a stepper built on the moved surface (cotanStiffness, lumpedMass), rows past the ELL width included', () => {
    for (const mesh of [icosphere(6, 1), fan()]) {
      const nS = 2, u = start(mesh, nS), dt = 0.01;
      const growing = new ReactionDiffusionStepper({ mesh, kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-3, 1e-3] }, { scheme: 'explicit', dt, growing: true });
      growing.setState(u);
      const m0 = lumpedMass(mesh);
      const p1 = moved(mesh);
      growing.setGeometry(p1);
      const movedMesh = makeMesh(p1, mesh.triangles);
      const m1 = lumpedMass(movedMesh);
      // the mass: the same sum of triangle areas over three, in another order: a few roundings apart
      for (let i = 0; i < m1.length; i++) expect(Math.abs(growing.mass[i] - m1[i]) / m1[i]).toBeLessThan(1e-14);
      const carried = u.map((v, q) => (v * m0[Math.floor(q / nS)]) / m1[Math.floor(q / nS)]);
      for (let q = 0; q < u.length; q++) expect(Math.abs(growing.state[q] - carried[q])).toBeLessThan(1e-14);
      const before = growing.state.slice();
      expect(growing.step(0.3)).toBe(true);
      const ref = referenceExplicit(movedMesh, kinetics2, [0.037, 0.06], [2e-3, 1e-3], before, dt, 0.3);
      for (let q = 0; q < ref.length; q++) expect(Math.abs(growing.state[q] - ref[q]), `value ${q}`).toBeLessThan(1e-14);
    }
  });

  it('checkMove finds a triangle turned over, one shrunk below the ratio, a non-finite one, and passes a fair move', async () => {
    const mesh = icosphere(8, 1);
    for (const t of [undefined, await team(2)]) {
      const st = new ReactionDiffusionStepper({ mesh, kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-3, 1e-3] }, { scheme: 'explicit', dt: 1e-3, growing: true, team: t });
      expect(st.checkMove(moved(mesh), 1e-3)).toBe(true);
      // the last triangle's first vertex reflected through the midpoint of its opposite edge turns it over
      const over = mesh.positions.slice(), last = mesh.triangles.length - 3;
      const [a, b, c] = [0, 1, 2].map((k) => 3 * mesh.triangles[last + k]);
      for (let d = 0; d < 3; d++) over[a + d] = over[b + d] + over[c + d] - over[a + d];
      expect(st.checkMove(over, 1e-3)).toBe(false);
      // a triangle shrunk to 1e-4 of its area (vertices of triangle 0 pulled to their centroid)
      const shrunk = mesh.positions.slice(), tri = mesh.triangles;
      for (let d = 0; d < 3; d++) {
        const c = (shrunk[3 * tri[0] + d] + shrunk[3 * tri[1] + d] + shrunk[3 * tri[2] + d]) / 3;
        for (let k = 0; k < 3; k++) shrunk[3 * tri[k] + d] = c + 1e-2 * (shrunk[3 * tri[k] + d] - c);
      }
      expect(st.checkMove(shrunk, 1e-3)).toBe(false);
      expect(st.checkMove(shrunk, 1e-5)).toBe(true);
      const broken = mesh.positions.slice();
      broken[3 * 7] = NaN;
      expect(st.checkMove(broken, 1e-3)).toBe(false);
    }
  });

  it('a D-weighted stiffness and the CG preconditioner follow the surface: the same steps as a stepper built on the moved surface', () => {
    const mesh = icosphere(8, 1);
    const field = new Float64Array(mesh.positions.length / 3).map((_, i) => 0.02 * (1.5 + mesh.positions[3 * i]));
    const system = { mesh, kinetics: kinetics3, parameters: [], diffusion: [0.01, 0, field] };
    for (const options of [{ scheme: 'explicit', dt: 1e-3 }, { scheme: 'imex', dt: 0.1, tolerance: 1e-13 }, { scheme: 'imex', dt: 0.1, solver: 'cholesky' }] as StepperOptions[]) {
      const growing = new ReactionDiffusionStepper(system, { ...options, growing: true });
      const p1 = moved(mesh);
      growing.setGeometry(p1);
      const fresh = new ReactionDiffusionStepper({ ...system, mesh: makeMesh(p1, mesh.triangles) }, options);
      const u = start(mesh, 3);
      growing.setState(u);
      fresh.setState(u);
      for (let k = 0; k < 3; k++) { growing.step(0.1 * k); fresh.step(0.1 * k); }
      // explicit and Cholesky: round-off of the reassembly; CG: both converge to 1e-13 of ‖b‖
      for (let q = 0; q < u.length; q++) expect(Math.abs(growing.state[q] - fresh.state[q]), `${options.scheme} ${options.solver ?? ''} value ${q}`).toBeLessThan(1e-11);
    }
  });
});

describe('threads', () => {
  const cases: [string, () => { mesh: Mesh; kinetics: CompiledKinetics; parameters: number[]; diffusion: (number | Float64Array)[] }, StepperOptions][] = [
    ['explicit, two species', () => ({ mesh: icosphere(20, 1), kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] }), { scheme: 'explicit', dt: 0.5 }],
    ['implicit–explicit CG, a field diffusion', () => {
      const mesh = icosphere(20, 1);
      return { mesh, kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-5, new Float64Array(mesh.positions.length / 3).map((_, i) => 1e-5 * (1.5 + mesh.positions[3 * i]))] };
    }, { scheme: 'imex', dt: 1 }],
    ['implicit–explicit CG, three species, one still', () => ({ mesh: icosphere(20, 1), kinetics: kinetics3, parameters: [], diffusion: [0.01, 0, 0.02] }), { scheme: 'imex', dt: 0.1 }],
    ['explicit on a growing surface', () => ({ mesh: icosphere(20, 1), kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] }), { scheme: 'explicit', dt: 0.5, growing: true }],
    ['implicit–explicit CG on a growing surface, a field diffusion', () => {
      const mesh = icosphere(20, 1);
      return { mesh, kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-5, new Float64Array(mesh.positions.length / 3).map((_, i) => 1e-5 * (1.5 + mesh.positions[3 * i]))] };
    }, { scheme: 'imex', dt: 1, growing: true }],
  ];
  for (const [name, system, options] of cases) {
    it(`${name}: 1, 2 and 3 threads give the same state to the bit`, async () => {
      const results: Float64Array[] = [];
      for (const size of [1, 2, 3]) {
        const sys = system();
        const st = new ReactionDiffusionStepper(sys, { ...options, team: await team(size) });
        expect(st.threads).toBe(size); // 4002 vertices: 4 blocks, shared out
        st.setState(start(sys.mesh, sys.kinetics.species.length));
        for (let k = 0; k < 15; k++) {
          if (options.growing && k % 5 === 4) st.setGeometry(sys.mesh.positions.map((x, q) => x * (1 + 0.002 * k * (1 + (q % 3)))));
          expect(st.step(k * options.dt)).toBe(true);
        }
        results.push(st.state.slice());
      }
      for (const r of results.slice(1)) expect(r.every((v, q) => Object.is(v, results[0][q]))).toBe(true);
    });
  }

  it('a run on 1, 2 and 3 threads writes the same frames and state.bin, byte for byte', async () => {
    // 66 000 vertices: enough rows (16 384 a thread) for three threads
    const file = temp.write('big.yaml', `
seed: 2
mesh: {shape: sphere, params: {radius: 0.5}, vertices: 66000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 5, radius: 0.06, values: {u: 0.5, v: 0.25}}, noise: {amplitude: 0.01, species: [v]}}
time: {scheme: imex, step: 1, end: 30}
output: {every: 10}
analysis: {modes: 0}
`);
    const bytes: Record<string, Buffer>[] = [];
    for (const threads of [1, 2, 3]) {
      const out = temp.path(`big-${threads}`);
      const o = await runScenarioFile(file, { out, threads, progress: 'none', log: () => {} });
      expect(o.reason).toBe('end');
      const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
      expect(record.threads).toEqual({ requested: threads, used: threads });
      const files: Record<string, Buffer> = { 'state.bin': readFileSync(join(out, 'state.bin')), 'final.ply': readFileSync(join(out, 'final.ply')) };
      for (const f of readdirSync(join(out, 'frames'))) files[f] = readFileSync(join(out, 'frames', f));
      bytes.push(files);
    }
    for (const b of bytes.slice(1)) for (const k of Object.keys(bytes[0])) expect(b[k].equals(bytes[0][k]), k).toBe(true);
  }, 120_000);

  it('a thread that throws stops the step with a clear message, the last good state kept', async () => {
    const r = resolveScenarioText(`
mesh: {shape: sphere, vertices: 4002}
kinetics: {model: gray-scott}
initial: {spots: {count: 3, radius: 0.2, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 50}
output: {every: 10}
analysis: {modes: 0}
`);
    const t = (await team(2))!;
    const engine = new RunEngine(r, undefined, t);
    expect(engine.threads).toBe(2);
    expect(engine.advance({ maxSteps: 3 }).kind).toBe('paused');
    const good = engine.state.slice();
    t.failNext(1);
    const ev = engine.advance({ maxSteps: 3 });
    expect(ev).toMatchObject({ kind: 'failed', reason: 'thread', step: 3 });
    expect((ev as { message: string }).message).toMatch(/^worker thread 1 failed: a fault injected for a test at t=3\.00000 \(step 3\)/);
    expect(engine.state.every((v, q) => Object.is(v, good[q]))).toBe(true);
  });

  it('a thread that throws in a geometry update leaves the state and the surface as they were', async () => {
    const mesh = icosphere(20, 1);
    const st = new ReactionDiffusionStepper({ mesh, kinetics: kinetics2, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] }, { scheme: 'explicit', dt: 0.5, growing: true, team: await team(2) });
    st.setState(start(mesh, 2));
    st.step(0);
    const state = st.state.slice(), mass = st.mass.slice();
    (st as unknown as { team: ThreadTeam }).team.failNext(1);
    expect(() => st.setGeometry(mesh.positions.map((x) => 1.1 * x))).toThrow(/worker thread 1 failed: a fault injected for a test/);
    expect(st.state.every((v, q) => Object.is(v, state[q]))).toBe(true);
    expect(st.surface.positions).toBe(mesh.positions);
    // the stepper is not used again after a failure; a new one on the kept state continues the run
    expect(mass.every((v) => v > 0)).toBe(true);
  });

  it('in a run, a failing thread ends it as failed, resumable, with the last good state written', async () => {
    const file = temp.write('fail.yaml', 'mesh: {shape: sphere, vertices: 40000}\nkinetics: {model: gray-scott}\ninitial: {spots: {count: 3, radius: 0.2, values: {u: 0.5, v: 0.25}}}\ntime: {scheme: explicit, end: 400}\noutput: {every: 100}\nanalysis: {modes: 0}\n');
    const out = temp.path('fail');
    let lines = '';
    const o = await runScenarioFile(file, { out, threads: 2, progress: 'none', log: (l) => (lines += l + '\n'), onTeam: (t) => t.failNext(1) });
    expect(o.reason).toBe('failed');
    expect(o.message).toMatch(/worker thread 1 failed: a fault injected for a test at t=0\.00000 \(step 0\)\. The last good state \(t=0\.00000\) is in final\.ply and state\.bin\. Continue it with: placode run --resume/);
    expect(JSON.parse(readFileSync(join(out, 'record.json'), 'utf8')).status).toBe('failed');
    const resumed = await resumeRun(out, { threads: 2, progress: 'none', log: () => {} });
    expect(resumed.reason).toBe('end');
  });

  it('time.threads sets a run\'s threads, --threads overrides it, and a mesh too small for them uses fewer and says so', async () => {
    const scenario = (vertices: number, threads: number) => `mesh: {shape: sphere, vertices: ${vertices}}\nkinetics: {model: gray-scott}\ntime: {scheme: imex, step: 1, end: 1, threads: ${threads}}\nanalysis: {modes: 0}\n`;
    const cases: [number, number, number | undefined, { requested: number; used: number }, RegExp][] = [
      [40000, 2, undefined, { requested: 2, used: 2 }, /, 2 threads →/], // 40 000 rows: two members of 16 384
      [40000, 2, 1, { requested: 1, used: 1 }, /, 1 thread →/],
      [4002, 8, undefined, { requested: 8, used: 1 }, /, 1 thread \(of 8 asked for: a smaller mesh would not gain from more\) →/],
    ];
    for (const [k, [vertices, inScenario, option, recorded, line]] of cases.entries()) {
      const out = temp.path(`threads-${k}`);
      let lines = '';
      const o = await runScenarioFile(temp.write(`threads-${k}.yaml`, scenario(vertices, inScenario)), { out, threads: option, defaultThreads: 5, progress: 'none', log: (l) => (lines += l + '\n') });
      expect(o.reason).toBe('end');
      expect(JSON.parse(readFileSync(join(out, 'record.json'), 'utf8')).threads).toEqual(recorded);
      expect(lines).toMatch(line);
    }
  });
});
