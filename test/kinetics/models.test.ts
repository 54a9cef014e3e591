import { describe, expect, it } from 'vitest';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { realCubicRoots } from '../../solver/kinetics/realCubicRoots.ts';

function compiled(name: string) {
  const m = MODELS[name];
  return { m, k: compileKinetics(m.species, m.reactions, Object.keys(m.parameters)) };
}
const defaults = (name: string) => Object.fromEntries(Object.entries(MODELS[name].parameters).map(([k, p]) => [k, p.default]));
/** a diffusion coefficient of a model: a number or a formula in its parameters (the built-ins use products only) */
function diffusionOf(name: string, species: string, p: Record<string, number>): number {
  const d = MODELS[name].diffusion[species];
  return typeof d === 'number' ? d : d.split('*').reduce((acc, f) => acc * (p[f.trim()] ?? Number(f)), 1);
}

describe('built-in kinetics', () => {
  it('every closed-form steady state is a zero of the compiled rates', () => {
    for (const name of Object.keys(MODELS)) {
      const { m, k } = compiled(name);
      const p = defaults(name);
      const states = m.steadyStates!(p);
      expect(states.length, name).toBeGreaterThan(0);
      for (const s of states) {
        const f = k.evaluate(s, Object.values(p), new Float64Array(s.length));
        for (const r of f) expect(Math.abs(r), `${name} at ${s}`).toBeLessThan(1e-9 * Math.max(1, ...Object.values(p).map(Math.abs)));
      }
    }
  });

  it('Schnakenberg a = 0.1, b = 0.9: steady state (1, 0.9) (Murray, Mathematical Biology II, ch. 2)', () => {
    expect(MODELS.schnakenberg.steadyStates!({ gamma: 1, a: 0.1, b: 0.9, d: 10 })).toEqual([[1, 0.9]]);
  });

  it('Gray–Scott: three homogeneous states exactly when F ≥ 4(F + k)² (Pearson, Science 1993)', () => {
    const gs = MODELS['gray-scott'].steadyStates!;
    expect(gs({ F: 0.037, k: 0.06 })).toEqual([[1, 0]]); // 0.037 < 4·0.097² = 0.0376
    const three = gs({ F: 0.04, k: 0.05 }); // 0.04 ≥ 4·0.09² = 0.0324
    expect(three.length).toBe(3);
    for (const [u, v] of three.slice(1)) {
      expect(0.04 * (1 - u) - u * v * v).toBeCloseTo(0, 12);
      expect(u * v * v - 0.09 * v).toBeCloseTo(0, 12);
    }
  });

  it('default parameters of the Turing models satisfy Murray\'s four conditions (Mathematical Biology II, eq. 2.24–2.27)', () => {
    // u_t = f + D_u Δu, v_t = g + D_v Δv with d = D_v/D_u: (i) f_u + g_v < 0, (ii) det J > 0,
    // (iii) d f_u + g_v > 0, (iv) (d f_u + g_v)² > 4 d det J.
    for (const name of ['schnakenberg', 'gierer-meinhardt', 'brusselator', 'fitzhugh-nagumo', 'bvam', 'lengyel-epstein']) {
      const { m, k } = compiled(name);
      const p = defaults(name);
      const s = m.steadyStates!(p)[0];
      const [fu, fv, gu, gv] = k.jacobian(s, Object.values(p));
      const d = diffusionOf(name, 'v', p) / diffusionOf(name, 'u', p);
      const det = fu * gv - fv * gu;
      expect(fu + gv, `${name} (i)`).toBeLessThan(0);
      expect(det, `${name} (ii)`).toBeGreaterThan(0);
      expect(d * fu + gv, `${name} (iii)`).toBeGreaterThan(0);
      expect((d * fu + gv) ** 2, `${name} (iv)`).toBeGreaterThan(4 * d * det);
    }
  });

  it('cubic roots match the expanded polynomial (three, one and repeated roots)', () => {
    const check = (roots: number[], expected: number[]) => {
      expect(roots.length).toBe(expected.length);
      roots.forEach((r, i) => expect(r).toBeCloseTo(expected[i], 10));
    };
    check(realCubicRoots(1, -6, 11, -6), [1, 2, 3]); // (x−1)(x−2)(x−3)
    check(realCubicRoots(2, 0, 2, -4), [1]); // 2(x−1)(x²+x+2)
    check(realCubicRoots(1, -3, 3, -1), [1]); // (x−1)³
    check(realCubicRoots(0, 1, -3, 2), [1, 2]);
  });
});
