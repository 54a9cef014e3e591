import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Barrio–Varea–Aragón–Maini (BVAM) model, a general cubic expansion about the
 * steady state (0, 0):
 * u_t = D δ Δu + α u(1 − r₁v²) + v(1 − r₂u),
 * v_t = δ Δv + β v(1 + α r₁ uv/β) + u(γ + r₂v).
 * The linear part is [[α, 1], [γ, β]]; (0, 0) is always a steady state.
 * (Form as recalled from the paper, from memory.)
 */
export const barrioVareaAragon: KineticsModel = {
  name: 'bvam',
  title: 'Barrio–Varea–Aragón–Maini',
  description: 'cubic and quadratic couplings select spots (r₂) or stripes (r₁)',
  citation: 'R. A. Barrio, C. Varea, J. L. Aragón & P. K. Maini, Bull. Math. Biol. 61 (1999) 483–505',
  species: ['u', 'v'],
  reactions: {
    u: 'alpha*u*(1 - r1*v^2) + v*(1 - r2*u)',
    v: 'beta*v + alpha*r1*u*v^2 + u*(g + r2*v)',
  },
  parameters: {
    alpha: { default: 0.899, description: 'linear self-activation of u' },
    beta: { default: -0.91, description: 'linear self-decay of v' },
    g: { default: -0.899, description: 'linear coupling γ of v to u' },
    r1: { default: 0.02, description: 'cubic coupling (stripes)' },
    r2: { default: 0.2, description: 'quadratic coupling (spots)' },
    D: { default: 0.516, description: 'diffusion ratio D_u/D_v' },
    delta: { default: 0.0021, description: 'diffusion scale δ' },
  },
  diffusion: { u: 'D*delta', v: 'delta' },
  steadyStates: () => [[0, 0]],
  suggestedStep: 0.02,
};
