import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Gray–Scott in Pearson's scaling: U_t = D_u ΔU − UV² + F(1 − U),
 * V_t = D_v ΔV + UV² − (F + k)V. Homogeneous states: (1, 0) always; when
 * F ≥ 4(F + k)², also V = [F ± √(F² − 4F(F + k)²)] / (2(F + k)), U = (F + k)/V
 * (from F(1 − U) = UV² and UV = F + k).
 */
export const grayScott: KineticsModel = {
  name: 'gray-scott',
  title: 'Gray–Scott',
  description: 'autocatalysis U + 2V → 3V with feed F and kill k (Pearson scaling)',
  citation: 'J. E. Pearson, "Complex patterns in a simple system", Science 261 (1993) 189–192',
  species: ['u', 'v'],
  reactions: { u: '-u*v^2 + F*(1 - u)', v: 'u*v^2 - (F + k)*v' },
  parameters: {
    F: { default: 0.037, description: 'feed rate' },
    k: { default: 0.06, description: 'kill rate' },
  },
  diffusion: { u: 2e-5, v: 1e-5 },
  steadyStates: ({ F, k }) => {
    const out = [[1, 0]];
    const disc = F * F - 4 * F * (F + k) * (F + k);
    if (F > 0 && disc >= 0) {
      for (const sign of [1, -1]) {
        const v = (F + sign * Math.sqrt(disc)) / (2 * (F + k));
        out.push([(F + k) / v, v]);
        if (disc === 0) break;
      }
    }
    return out;
  },
  suggestedStep: 1,
  display: 'v',
};
