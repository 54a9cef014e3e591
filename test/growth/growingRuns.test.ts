import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { refineMidpoint } from '../../solver/mesh/refineMidpoint.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { transferToRefinement } from '../../solver/growth/transferToRefinement.ts';
import { observedOrder } from '../fixtures/meshes.ts';


let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'placode-grow-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const scenario = (name: string, text: string) => { const f = join(dir, name); writeFileSync(f, text); return f; };

describe('refinement transfer', () => {
  it('conserves Σ M U exactly and carries a smooth field with O(h²) error', () => {
    const errors: number[] = [], hs: number[] = [];
    for (const nu of [4, 8, 16]) {
      const coarse = icosphere(nu, 1);
      const f = (x: number, y: number, z: number) => Math.sin(2 * x) * Math.cos(y) + z * z;
      const n = coarse.positions.length / 3;
      const state = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) { const p = coarse.positions; state[2 * i] = f(p[3 * i], p[3 * i + 1], p[3 * i + 2]); state[2 * i + 1] = 1 + p[3 * i]; }
      const rf = refineMidpoint(coarse);
      const before = lumpedMass(coarse), after = lumpedMass(rf.mesh);
      const carried = transferToRefinement(state, before, rf, after, 2);
      for (let s = 0; s < 2; s++) {
        let want = 0, have = 0;
        for (let i = 0; i < n; i++) want += before[i] * state[2 * i + s];
        for (let i = 0; i < after.length; i++) have += after[i] * carried[2 * i + s];
        expect(Math.abs(have - want)).toBeLessThan(1e-13 * Math.abs(want));
      }
      // interpolation error at the new (midpoint) vertices
      let e = 0;
      const q = rf.mesh.positions;
      for (let i = n; i < after.length; i++) e = Math.max(e, Math.abs(carried[2 * i] - f(q[3 * i], q[3 * i + 1], q[3 * i + 2])));
      errors.push(e);
      hs.push(1 / nu);
    }
    expect(observedOrder(errors[0], errors[1], hs[0], hs[1])).toBeGreaterThan(1.7);
    expect(observedOrder(errors[1], errors[2], hs[1], hs[2])).toBeGreaterThan(1.7);
  });
});

const GROWING = `
seed: 4
mesh: {shape: sphere, vertices: 1000}
kinetics: {model: schnakenberg, parameters: {gamma: 30}}
initial: {noise: 0.01}
time: {scheme: imex, step: 0.005, end: 30, solver: cholesky}
output: {every: 2, colour: u}
growth: {law: uniform, rate: 0.03, tolerance: 0.005, refine: {edgeGrowth: 1.6}}
analysis: {modes: 0}
`;

describe('growing runs', () => {
  it('slow uniform growth in the Turing regime gains spots as the sphere grows (Crampin, Gaffney & Maini, Bull. Math. Biol. 1999)', async () => {
    // Schnakenberg a = 0.1, b = 0.9, d = 10, γ = 30: band 6 < k² < 15 on the unit sphere, one or two
    // spots' worth; the radius grows e^{0.9} ≈ 2.5-fold, so the band then holds degrees l ≈ 6–9.
    const out = join(dir, 'crampin');
    const r = await run('run', scenario('crampin.yaml', GROWING), '--out', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const counts: [number, number][] = record.analysis.frames.map((f: { time: number; patches: unknown[] }) => [f.time, f.patches.length]);
    const mean = (from: number, to: number) => {
      const c = counts.filter(([t]) => t >= from && t <= to).map(([, x]) => x);
      return c.reduce((a, x) => a + x, 0) / c.length;
    };
    // patches come and go as spots split and merge; on average the last third holds more than
    // twice as many as the pattern's first settled stretch (t = 2…10, after the noise has gone)
    expect(mean(20, 30)).toBeGreaterThan(2 * mean(2, 10));
    expect(counts[counts.length - 1][1]).toBeGreaterThan(Math.max(...counts.filter(([t]) => t >= 2 && t <= 10).map(([, c]) => c)));
    expect(record.analysis.events.some((e: { kind: string }) => e.kind === 'split' || e.kind === 'insertion')).toBe(true);
    // the record logs the law and the refinement; metrics carry area and growth factor
    expect(record.growth.description).toMatch(/^uniform exponential scaling about .* at rate 0.03$/);
    expect(record.growth.refinements).toEqual([expect.objectContaining({ from: 1002, to: 4002 })]);
    const csv = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\n');
    expect(csv[0].endsWith(',patches,dominant_eigenvalue,area,growth_factor,vertices')).toBe(true);
    const last = csv[csv.length - 1].split(',').map(Number);
    expect(last.at(-2)).toBeCloseTo(Math.exp(0.03 * 30), 10); // ρ(30) = e^{0.9}: the surface is moved to each output time
    expect(last.at(-1)).toBe(4002);
    // frames hold the grown geometry
    const first = loadMeshFile(join(out, 'frames', '0000.ply')).mesh;
    const lastFrame = loadMeshFile(join(out, 'frames', readdirSync(join(out, 'frames')).sort().at(-1)!)).mesh;
    expect(meshArea(lastFrame) / meshArea(first)).toBeCloseTo(Math.exp(2 * 0.03 * 30), 5); // float32 coordinates
  }, 60_000);

  it('an interrupted growing run (across a refinement) resumes to the same bytes', async () => {
    const file = join(dir, 'crampin.yaml');
    const out = join(dir, 'crampin-resumed');
    const first = await runScenarioFile(file, { out, progress: 'none', interruptAfterSteps: 2000, log: () => {} });
    expect(first.reason).toBe('interrupted');
    expect((await run('run', '--resume', out, '--progress', 'none')).code).toBe(0);
    for (const f of ['final.ply', 'metrics.csv', 'state.bin']) {
      expect(readFileSync(join(out, f)).equals(readFileSync(join(dir, 'crampin', f))), f).toBe(true);
    }
  }, 60_000);

  it('growth that folds the surface stops with the time and place named', async () => {
    const file = scenario('fold.yaml', `
mesh: {shape: sphere, vertices: 500}
kinetics: {model: schnakenberg}
time: {scheme: imex, step: 0.001, end: 1}
growth: {law: anisotropic, course: linear, rates: [0, 0, -2]}
`);
    const r = await run('run', file, '--out', join(dir, 'fold'), '--progress', 'none');
    expect(r.code).toBe(3);
    // ρ_z = 1 − 2t flattens the sphere at t = 0.5 and would mirror it after
    expect(r.err).toMatch(/growth made triangle \d+ (turn over \(inverted\)|collapse) at t=0\.[45][0-9]*, near \(/);
    const record = JSON.parse(readFileSync(join(dir, 'fold', 'record.json'), 'utf8'));
    expect(record.stop.reason).toBe('degenerate');
  });

  it('bad growth sections get their own errors', async () => {
    const cases: [string, RegExp][] = [
      ['growth: {law: uniform}', /growth: missing "rate"/],
      ['growth: {law: normal, speed: "x +"}', /growth\.speed: in "x \+".*cannot parse/],
      ['growth: {law: anisotropic, rates: [1, 2, 3], speed: "x"}', /growth\.speed: "speed" does not apply to law: anisotropic/],
      ['growth: {law: twist}', /growth\.law: must be one of "uniform", "anisotropic", "normal"/],
      ['growth: {law: uniform, rate: 1, capacity: 3}', /growth\.capacity: capacity applies to course: logistic/],
      ['growth: {law: uniform, rate: 1, refine: {maxVertices: 1000}}', /growth\.refine: say when to refine: edgeGrowth/],
      ['growth: {law: normal}', /growth: missing "speed" \(along the normal\) or "expansion"/],
      ['growth: {law: normal, speed: {vertexData: rate}}', /growth\.speed: the mesh has no per-vertex value "rate"/],
      ['growth: {law: uniform, rate: 1, expansion: "x"}', /growth\.expansion: "expansion" does not apply to law: uniform/],
      ['growth: {law: uniform, rate: 1, keyframes: [{time: 1, file: a.ply}]}', /growth\.keyframes: "keyframes" applies to law: keyframes/],
    ];
    for (const [growth, pattern] of cases) {
      const file = scenario('badgrowth.yaml', `mesh: {shape: sphere, vertices: 100}\nkinetics: {model: schnakenberg}\ntime: {end: 1}\n${growth}\n`);
      const r = await run('run', file, '--out', join(dir, 'never'));
      expect(r.code, growth).toBe(1);
      expect(r.err, growth).toMatch(pattern);
    }
  });
});

describe('growth fields from the mesh file', () => {
  it('per-vertex normal speeds and a tangential expansion move the surface and keep Σ M U', async () => {
    const { saveMeshFile } = await import('../../solver/io/meshFiles.ts');
    const { buildShape } = await import('../../meshes/shapes/index.ts');
    const { mesh } = buildShape({ shape: 'limb-bud', vertices: 1500 });
    const n = mesh.positions.length / 3;
    const rate = new Float64Array(n);
    for (let i = 0; i < n; i++) rate[i] = 0.2 * Math.max(0, mesh.positions[3 * i] - 2); // the distal third
    saveMeshFile(join(dir, 'bud.ply'), mesh, { properties: { rate } });
    const file = scenario('bud.yaml', `
mesh: {file: bud.ply}
kinetics: {species: [u], reactions: {u: "0"}}
diffusion: {u: 0.05}
initial: {values: {u: "1 + 0.3*y"}}
time: {scheme: imex, step: 0.01, end: 2}
output: {every: 1}
growth: {law: normal, speed: {vertexData: rate}, expansion: "0.1*x"}
analysis: {modes: 0}
`);
    const out = join(dir, 'bud');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    const rows = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    for (const x of rows) expect(x[5]).toBeCloseTo(rows[0][5], 10); // u_integral
    expect(rows[2][8]).toBeGreaterThan(rows[0][8]); // area grew (normal speed outward at the tip)
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.growth.description).toBe('growth along the normal at speed the per-vertex values "rate", with tangential expansion at areal rate 0.1*x');
  }, 60_000);
});

describe('refinement for the pattern wavelength', () => {
  it('refines until the mean edge is below the fastest wavelength over perWavelength', async () => {
    const file = scenario('pw.yaml', `
mesh: {shape: sphere, vertices: 500}
kinetics: {model: schnakenberg, parameters: {gamma: 30}}
time: {scheme: imex, step: 0.005, end: 8}
output: {every: 4}
growth: {law: uniform, rate: 0.1, refine: {perWavelength: 12}}
analysis: {modes: 0}
`);
    const out = join(dir, 'pw');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    expect(record.growth.refinements.map((x: { to: number }) => x.to)).toEqual([1962, 7842]);
    // Schnakenberg a = 0.1, b = 0.9, d = 10, γ = 30: the fastest k² lies in 6 < k² < 15, so the
    // wavelength 2π/√k² is at least 2π/√15 ≈ 1.62 and the refined edges must be below 1.62/12
    const { edgeLengthStats } = await import('../../solver/mesh/edgeLengthStats.ts');
    const final = loadMeshFile(join(out, 'final.ply')).mesh;
    expect(edgeLengthStats(final).mean).toBeLessThan((2 * Math.PI) / Math.sqrt(15) / 12);
  }, 60_000);
});

describe('the predicted pattern on a growing surface (stability analysis, recomputed as it grows)', () => {
  it('the predicted degree rises as the sphere grows: the band is fixed in k², the eigenvalues l(l+1)/R² fall', async () => {
    const file = scenario('tracked.yaml', `
mesh: {shape: sphere, vertices: 1000}
kinetics: {model: schnakenberg, parameters: {gamma: 30}}
time: {scheme: imex, step: 0.005, end: 10}
output: {every: 1, colour: u}
growth: {law: uniform, rate: 0.1}
analysis: {modes: 10}
`);
    const out = join(dir, 'tracked');
    expect((await run('run', file, '--out', out, '--progress', 'none')).code).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const p: { time: number; area: number; predicted: { eigenvalue: number } | null }[] = record.analysis.predictions;
    expect(p.length).toBeGreaterThan(5);
    // recomputed at every output time (every 1), on a surface grown by e^{0.2} in area since
    expect(p.map((x) => x.time)).toEqual(Array.from({ length: 11 }, (_, k) => k));
    for (let k = 1; k < p.length; k++) expect(p[k].area / p[k - 1].area).toBeCloseTo(Math.exp(0.2), 6);
    // with R = e^{0.1t} the degree maximising the growth rate of l(l+1)/R² (γ = 30: band 6…15) rises
    const degree = (e: number, area: number) => Math.round((-1 + Math.sqrt(1 + (e * area) / Math.PI)) / 2); // R² = area/4π
    const degrees = p.map((x) => degree(x.predicted!.eigenvalue, x.area));
    expect(degrees[0]).toBe(3);
    expect(degrees[degrees.length - 1]).toBeGreaterThanOrEqual(7);
    for (let k = 1; k < degrees.length; k++) expect(degrees[k]).toBeGreaterThanOrEqual(degrees[k - 1]);
  }, 60_000);
});
