import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';


let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'placode-stab-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenario = (name: string, text: string) => { const f = join(dir, name); writeFileSync(f, text); return f; };

/** l of a unit-sphere eigenvalue l(l+1) */
const degree = (lambda: number) => Math.round((-1 + Math.sqrt(1 + 4 * lambda)) / 2);

describe('placode stability', () => {
  it('prints the documented JSON: steady states, Turing band and fastest mode, surface modes in the band', async () => {
    const file = scenario('schnak.yaml', 'mesh: {shape: sphere, vertices: 2562}\nkinetics: {model: schnakenberg, parameters: {gamma: 50}}\ntime: {end: 1}\n');
    const paint = join(dir, 'predicted.ply');
    const r = await run('stability', file, '--json', '--paint', paint);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.steadyStates).toEqual([expect.objectContaining({ values: { u: 1, v: 0.9 }, stableWithoutDiffusion: true })]);
    expect(j.turing.unstable).toBe(true);
    expect(j.turing.band[0]).toBeCloseTo(10, 8); // γ·0.2 (Murray's worked values a = 0.1, b = 0.9, d = 10)
    expect(j.turing.band[1]).toBeCloseTo(25, 8);
    expect(j.turing.fastest.k2).toBeGreaterThan(10);
    expect(j.turing.fastest.rate).toBeGreaterThan(0);
    // l = 3 (λ = 12) and l = 4 (λ = 20) lie in the band: 7 + 9 modes
    expect(j.modes.length).toBe(16);
    for (const m of j.modes) expect(Object.keys(m).sort()).toEqual(['eigenvalue', 'index', 'rate']);
    expect(degree(j.predicted.eigenvalue)).toBe(4);
    // the painted file holds the predicted mode
    const painted = loadMeshFile(paint);
    expect(painted.vertexData.mode.length).toBe(2562);
  });

  it('draws the dispersion relation: the marked surface eigenvalues are those of --json, the band and the predicted cluster as it reports them', async () => {
    const file = scenario('schnak-plot.yaml', 'mesh: {shape: sphere, vertices: 2562}\nkinetics: {model: schnakenberg, parameters: {gamma: 50}}\ntime: {end: 1}\n');
    const svg = join(dir, 'dispersion.svg'), png = join(dir, 'dispersion.png');
    const r = await run('stability', file, '--json', '--plot', svg);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.files).toEqual([svg]);
    const text = readFileSync(svg, 'utf8');
    const attr = (tag: string, name: string) => Number(new RegExp(`<${tag}[^>]*data-${name}="([^"]+)"`).exec(text)![1]);
    expect(attr('rect class="band"', 'from')).toBe(j.turing.band[0]);
    expect(attr('rect class="band"', 'to')).toBe(j.turing.band[1]);
    expect(attr('circle class="predicted"', 'eigenvalue')).toBe(j.predicted.eigenvalue);
    expect(attr('circle class="predicted"', 'rate')).toBe(j.predicted.rate);
    // the growing marks (filled) are the clusters of the modes in the band, with their multiplicities
    const marks = [...text.matchAll(/<circle class="mode" data-eigenvalue="([^"]+)" data-multiplicity="(\d+)" data-rate="([^"]+)"/g)].map((m) => ({ eigenvalue: Number(m[1]), multiplicity: Number(m[2]), rate: Number(m[3]) }));
    const growing = marks.filter((m) => m.rate > 0);
    expect(growing.reduce((a, m) => a + m.multiplicity, 0)).toBe(j.modes.length);
    for (const mode of j.modes) expect(growing.some((m) => Math.abs(m.eigenvalue - mode.eigenvalue) < 1e-3 * mode.eigenvalue)).toBe(true);
    expect(growing.map((m) => degree(m.eigenvalue))).toEqual([3, 4]);
    // axes carry units; the same plot as PNG
    expect(text).toMatch(/class="xlabel"[^>]*>k<tspan[^>]*baseline-shift="super">2<\/tspan> \(length<tspan[^>]*>−2<\/tspan>\)/);
    expect(text).toMatch(/class="ylabel"[^>]*>growth rate Re σ \(time<tspan/);
    expect((await run('stability', file, '--plot', png, '--plot-x', 'wavelength')).code).toBe(0);
    expect(readFileSync(png).subarray(1, 4).toString('latin1')).toBe('PNG');
  });

  it('writes a parameter-plane map as CSV and SVG with labelled axes', async () => {
    const file = join(dir, 'schnak.yaml');
    const prefix = join(dir, 'map');
    const r = await run('stability', file, '--map', 'gamma=20:200:12', '--map', 'd=5:30:10', '--map-out', prefix);
    expect(r.code, r.err).toBe(0);
    const csv = readFileSync(`${prefix}.csv`, 'utf8').trim().split('\n');
    expect(csv[0]).toBe('gamma,d,class,k2_min,k2_max,fastest_k2,fastest_rate,modes_in_band');
    expect(csv.length).toBe(1 + 120);
    // Murray's critical ratio for a = 0.1, b = 0.9 is d_c ≈ 8.57: rows below it are stable, above Turing
    for (const row of csv.slice(1)) {
      const [, d, cls] = row.split(',');
      expect(cls).toBe(Number(d) < 8.5676 ? 'stable' : 'turing');
    }
    const svg = readFileSync(`${prefix}.svg`, 'utf8');
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.match(/<rect class="cell /g)!.length).toBe(120);
    expect(svg).toMatch(/<text class="xlabel"[^>]*>gamma<\/text>/);
    expect(svg).toMatch(/<text class="ylabel"[^>]*>d<\/text>/);
    expect(svg.match(/class="xtick"/g)!.length).toBeGreaterThanOrEqual(3);
  });

  it('gives clear errors for a bad map request', async () => {
    const file = join(dir, 'schnak.yaml');
    const r = await run('stability', file, '--map', 'gamma=1:2:5', '--map', 'q=1:2:5', '--map-out', join(dir, 'bad'));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--map: the kinetics has no parameter "q" \(it has gamma, a, b, d\)/);
    const r2 = await run('stability', file, '--map', 'gamma=1:2');
    expect(r2.code).toBe(2);
    expect(r2.err).toMatch(/--map takes exactly two parameters/);
  });
});

describe('prediction and simulation agree', () => {
  it('a run seeded by a small perturbation grows the predicted mode fastest (l = 4 over the close l = 3)', async () => {
    // γ = 50: growth rates 1.81 (l = 3) and 2.15 (l = 4) from the dispersion relation. Noise 1e-6 grows
    // by e^{2.15·4} ≈ 5·10³: still linear at t = 4, by when l = 4 leads by a factor e^{0.35·4} ≈ 4.
    const file = scenario('grow.yaml', `
seed: 5
mesh: {shape: sphere, vertices: 2562}
kinetics: {model: schnakenberg, parameters: {gamma: 50}}
initial: {noise: {amplitude: 1e-6, species: [u]}}
time: {scheme: imex, step: 0.0005, end: 4}
output: {every: 1, colour: u}
analysis: {modes: 40}
`);
    const out = join(dir, 'grow');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const predicted = record.analysis.prediction.predicted;
    expect(degree(predicted.eigenvalue)).toBe(4);
    const last = record.analysis.frames[record.analysis.frames.length - 1];
    expect(degree(last.dominantEigenvalue)).toBe(4);
    expect(last.dominantEigenvalue).toBeCloseTo(predicted.eigenvalue, 6);
    // and it took over: the noise spreads its power over all modes, the grown pattern holds most of it
    // (white noise gives each cluster power in proportion to its size: the largest computed one,
    // l = 5 with 11 of 39 modes, holds about 0.28)
    expect(record.analysis.frames[0].dominantFraction).toBeLessThan(0.5);
    expect(last.dominantFraction).toBeGreaterThan(0.95);
    const csv = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\n');
    expect(csv[csv.length - 1].split(',').at(-1)).toBe(String(last.dominantEigenvalue));
  });
});
