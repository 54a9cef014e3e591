import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../solver/scenario/parseScenario.ts';
import { Problems, type ResolveContext } from '../../solver/scenario/Problems.ts';
import { resolveKinetics } from '../../solver/scenario/resolveKinetics.ts';
import { resolvePainting } from '../../solver/scenario/resolveOutput.ts';
import { resolveScenarioText } from '../../solver/scenario/resolveScenarioText.ts';
import { GROWTH_LAWS } from '../../solver/scenario/growthLaws.ts';
import { SCENARIO_SCHEMA } from '../../solver/scenario/Scenario.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { meshArea } from '../../solver/mesh/triangleAreas.ts';

/** A resolver's context for a scenario text. */
function context(text: string): ResolveContext {
  const source = parseScenario(text, 'test.yaml');
  return { source, file: 'test.yaml', problems: new Problems(source), warnings: [] };
}

describe('scenario resolvers, one section at a time', () => {
  it('kinetics: a model\'s defaults overridden by the scenario, unknown parameters named with a hint', () => {
    const ok = context('mesh: {shape: sphere}\nkinetics: {model: gray-scott, parameters: {F: 0.03}}\ntime: {end: 1}\n');
    const kin = resolveKinetics(ok);
    expect(ok.problems.list).toEqual([]);
    // Pearson's (Science 1993) two rates, F given, k the model's default
    expect(kin.parameterSpec).toEqual({ F: 0.03, k: 0.06 });
    expect(kin.kinetics?.species).toEqual(['u', 'v']);
    const bad = context('mesh: {shape: sphere}\nkinetics: {model: gray-scott, parameters: {f: 0.03}}\ntime: {end: 1}\n');
    resolveKinetics(bad);
    expect(bad.problems.list).toMatchObject([{ path: 'kinetics.parameters.f', line: 2 }]);
    expect(bad.problems.list[0].message).toMatch(/did you mean "F"/);
  });

  it('painting: the model\'s display species by default; an unknown colormap lists the choices', () => {
    const ctx = context('mesh: {shape: sphere}\nkinetics: {model: schnakenberg}\ntime: {end: 1}\noutput: {colormap: jet}\n');
    const painting = resolvePainting(ctx, resolveKinetics(ctx));
    expect(painting.colour).toBe('u');
    expect(ctx.problems.list.map((p) => p.path)).toEqual(['output.colormap']);
    expect(ctx.problems.list[0].message).toMatch(/viridis.*magma/);
  });

  it('time: the explicit default step fits whole steps into the output interval under 0.9 × the positivity bound 1/(D·max K_ii/m_i)', () => {
    // diffusion fast enough that the positivity bound, not the model's suggested step, limits dt
    const r = resolveScenarioText('mesh: {shape: sphere, vertices: 642}\nkinetics: {model: gray-scott}\ndiffusion: {u: 0.2, v: 0.1}\ntime: {scheme: explicit, end: 100}\noutput: {every: 10}\n');
    const k = cotanStiffness(r.mesh), m = lumpedMass(r.mesh);
    let bound = 0;
    for (let i = 0; i < m.length; i++) for (let p = k.rowOffsets[i]; p < k.rowOffsets[i + 1]; p++) if (k.columns[p] === i) bound = Math.max(bound, k.values[p] / m[i]);
    const positivity = 1 / (0.2 * bound); // the larger D
    expect(r.dt).toBeLessThanOrEqual(0.9 * positivity * (1 + 1e-12));
    expect(positivity).toBeLessThan(1); // (so it binds: Gray–Scott's suggested step is 1)
    expect(r.output.everySteps * r.dt).toBeCloseTo(10, 12);
    // the largest such step: one step fewer per output would exceed the bound
    expect(10 / (r.output.everySteps - 1)).toBeGreaterThan(0.9 * positivity);
  });

  it('time: the default step stays inside the reactions\' forward-Euler limit; a given step beyond it is refused unless time.allowUnstable', () => {
    // Schnakenberg (a, b) = (0.1, 0.9) at (u, v) = (a + b, b/(a + b)²): J = γ·[[(b − a)/(a + b), (a + b)²], [−2b/(a + b), −(a + b)²]]
    // = γ·[[0.8, 1], [−1.8, −1]], trace −0.2γ, det γ², eigenvalues γ(−0.1 ± i√0.99) (Murray 2003, ch. 2, with
    // these a, b). Forward Euler needs |1 + dt·λ| ≤ 1: dt ≤ −2 Re λ/|λ|² = 0.2/γ = 6.67e-5 at γ = 3000.
    const gamma = 3000, limit = 0.2 / gamma;
    const text = (time: string) => `mesh: {shape: ellipsoid, vertices: 800}\nkinetics: {model: schnakenberg, parameters: {gamma: ${gamma}}}\ninitial: {noise: 0.01}\ntime: {${time}}\n`;
    for (const scheme of ['imex', 'explicit']) {
      const r = resolveScenarioText(text(`scheme: ${scheme}, end: 0.01`));
      const amplification = Math.hypot(1 - 0.1 * gamma * r.dt, Math.sqrt(0.99) * gamma * r.dt);
      expect(r.dt).toBeLessThanOrEqual(0.5 * limit * (1 + 1e-12));
      expect(amplification).toBeLessThan(1);
      expect(r.summary.time).toMatchObject({ reactionLimit: expect.closeTo(limit, 12) });
    }
    expect(() => resolveScenarioText(text('step: 1e-4, end: 0.01'))).toThrow(/time\.step: 0\.0001 makes the explicit reaction update unstable at the steady state \(\|1 \+ dt·λ\| = 1\.0[0-9]* > 1[^\n]*limit is 6\.67e-5[^\n]*time\.allowUnstable: true/);
    const allowed = resolveScenarioText(text('step: 1e-4, end: 0.01, allowUnstable: true'));
    expect(allowed.dt).toBe(1e-4);
    expect(allowed.warnings.join('\n')).toMatch(/limit is 6\.67e-5.*\(time\.allowUnstable: true\)/);
    // the explicit scheme's diffusion limit 2/(D·λmax) is refused the same way, and allowed the same way
    expect(() => resolveScenarioText('mesh: {shape: sphere, vertices: 300}\nkinetics: {model: gray-scott}\ndiffusion: {u: 1, v: 1}\ntime: {scheme: explicit, step: 10, end: 100}\n')).toThrow(/stability limit [0-9.e-]+ on this mesh[^\n]*time\.allowUnstable: true/);
    expect(resolveScenarioText('mesh: {shape: sphere, vertices: 300}\nkinetics: {model: gray-scott}\ndiffusion: {u: 1, v: 1}\ntime: {scheme: explicit, step: 10, end: 100, allowUnstable: true}\n').warnings.join('\n')).toMatch(/stability limit/);
  });

  it('growth: every law the schema names has a registry entry, and uniform growth scales the area by e^{2rt}', () => {
    expect(Object.keys(GROWTH_LAWS).sort()).toEqual([...SCENARIO_SCHEMA.properties.growth.properties.law.enum].sort());
    const r = resolveScenarioText('mesh: {shape: sphere, vertices: 642}\nkinetics: {model: schnakenberg}\ntime: {end: 1}\ngrowth: {law: uniform, rate: 0.3}\n');
    const law = r.growth!.makeLaw(r.mesh.positions, []);
    const out = new Float64Array(r.mesh.positions.length);
    law.advance(r.mesh, 0, 2, out);
    expect(meshArea({ positions: out, triangles: r.mesh.triangles }) / meshArea(r.mesh)).toBeCloseTo(Math.exp(2 * 0.3 * 2), 10);
    expect(r.growth!.centre).toBeDefined();
  });
});
