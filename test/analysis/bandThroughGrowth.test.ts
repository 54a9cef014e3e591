import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { affineGrowth } from '../../solver/growth/affineGrowth.ts';
import { bandThroughGrowth } from '../../solver/analysis/bandThroughGrowth.ts';

const temp = useTempFiles('placode-band-');

/** l of a unit-sphere eigenvalue l(l+1) */
const degree = (lambda: number) => Math.round((-1 + Math.sqrt(1 + 4 * lambda)) / 2);

describe('the unstable band through growth', () => {
  it('on a uniformly growing sphere, degree l enters the band when l(l+1)/R(t)² = k²₂ and leaves when it reaches k²₁ (closed form), converging at second order', () => {
    // R(t) = e^{rt}: l(l+1)e^{−2rt} = k² gives t = ln(l(l+1)/k²)/(2r)
    const r = 0.1, band: [number, number] = [10, 25], end = 10;
    const courses = [8, 16].map((f) => {
      const mesh = icosphere(f, 1);
      return bandThroughGrowth(mesh, affineGrowth(mesh.positions, [r, r, r], 'exponential', [0, 0, 0]), band, end, { maxModes: 110 });
    });
    for (const course of courses) expect(course.method).toBe('similarity');
    const errors = courses.map((course) => {
      const byDegree = new Map(course.clusters.map((c) => [degree(c.eigenvalue0), c]));
      return [5, 6, 7].map((l) => {
        const c = byDegree.get(l)!;
        expect(c.multiplicity).toBe(2 * l + 1);
        // the predicted times are the closed form at the computed eigenvalue, to the bisection's precision
        expect(c.enters!).toBeCloseTo(Math.log(c.eigenvalue0 / band[1]) / (2 * r), 9);
        const exactEnters = Math.log((l * (l + 1)) / band[1]) / (2 * r), exactLeaves = Math.log((l * (l + 1)) / band[0]) / (2 * r);
        if (exactLeaves < end - 0.5) expect(Math.abs(c.leaves! - exactLeaves)).toBeLessThan(0.5);
        return Math.abs(c.enters! - exactEnters);
      });
    });
    // the P1 eigenvalue error is O(h²) (see test/fem), so is the entry time's: halving h divides it by about 4
    for (let k = 0; k < 3; k++) {
      expect(errors[1][k]).toBeLessThan(errors[0][k] / 3);
      expect(errors[1][k]).toBeLessThan(0.15);
    }
    // degrees 3 and 4 (λ = 12, 20) are in the band from the start
    const fine = new Map(courses[1].clusters.map((c) => [degree(c.eigenvalue0), c]));
    expect(fine.get(3)!.enters).toBe(0);
    expect(fine.get(4)!.enters).toBe(0);
  });

  it('a non-similar growth recomputes the eigenvalues on the grown surface; for an anisotropic growth with equal rates it agrees with the similarity', () => {
    const mesh = icosphere(8, 1);
    const band: [number, number] = [10, 25];
    const exact = bandThroughGrowth(mesh, affineGrowth(mesh.positions, [0.1, 0.1, 0.1], 'exponential', [0, 0, 0]), band, 6, { maxModes: 60 });
    // the same scaling, hidden from the analysis as a general law
    const general = affineGrowth(mesh.positions, [0.1, 0.1, 0.1], 'exponential', [0, 0, 0]);
    const hidden = { description: general.description, advance: general.advance.bind(general) };
    const sampled = bandThroughGrowth(mesh, hidden, band, 6, { maxModes: 60, samples: 12 });
    expect(sampled.method).toBe('recomputed');
    expect(sampled.clusters.map((c) => c.index)).toEqual(exact.clusters.map((c) => c.index));
    // linear interpolation of e^{−2rt} between samples 0.5 apart: error ≤ (Δt)²/8 · max|λ''|/|λ'| = (0.25/8)·2r ≈ 0.006
    for (let k = 0; k < exact.clusters.length; k++) {
      if (exact.clusters[k].enters !== null) expect(Math.abs(sampled.clusters[k].enters! - exact.clusters[k].enters!)).toBeLessThan(0.01);
    }
  });

  it('placode stability reports and draws it; a growing run records the predicted entries beside the first insertion or split after each', async () => {
    const file = temp.write('growing.yaml', `
seed: 2
mesh: {shape: sphere, vertices: 642}
kinetics: {model: schnakenberg, parameters: {gamma: 50}}
initial: {noise: 0.01}
time: {scheme: imex, step: 0.002, end: 4}
output: {every: 1, frames: false}
growth: {law: uniform, rate: 0.1, centre: [0, 0, 0]}
analysis: {modes: 20}
`);
    const svg = temp.path('band.svg');
    const s = await run('stability', file, '--json', '--growth-plot', svg);
    expect(s.code, s.err).toBe(0);
    const j = JSON.parse(s.out);
    expect(j.growth.method).toBe('similarity');
    const entering = j.growth.clusters.filter((c: { enters: number }) => c.enters > 0);
    expect(entering.length).toBeGreaterThan(0);
    const drawn = [...readFileSync(svg, 'utf8').matchAll(/<circle class="entry" data-index="(\d+)" data-eigenvalue0="[^"]+" data-enters="([^"]+)"/g)].map((m) => [Number(m[1]), Number(m[2])]);
    expect(drawn).toEqual(entering.map((c: { index: number; enters: number }) => [c.index, c.enters]));
    const out = temp.path('growing-run');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    const record = JSON.parse(readFileSync(join(out, 'record.json'), 'utf8'));
    const entries = record.analysis.bandEntries as { index: number; enters: number | null; firstEventAfter: { time: number; kind: string } | null }[];
    expect(entries.map((e) => [e.index, e.enters])).toEqual(j.growth.clusters.map((c: { index: number; enters: number | null }) => [c.index, c.enters]));
    for (const e of entries) if (e.firstEventAfter) {
      expect(e.firstEventAfter.time).toBeGreaterThanOrEqual(e.enters!);
      expect(['insertion', 'split']).toContain(e.firstEventAfter.kind);
    }
  }, 120_000);
});
