import type { KineticsModel } from '../KineticsModel.ts';
import { realCubicRoots } from '../realCubicRoots.ts';

/**
 * FitzHugh–Nagumo in a Turing regime: u_t = u − u³ − v + D_u Δu,
 * v_t = ε(u − a₁v − a₀) + D_v Δv, with a fast-diffusing inhibitor v.
 * Steady states: v = (u − a₀)/a₁ and u³ + (1/a₁ − 1)u − a₀/a₁ = 0 (Cardano).
 */
export const fitzHughNagumo: KineticsModel = {
  name: 'fitzhugh-nagumo',
  title: 'FitzHugh–Nagumo',
  description: 'excitable activator u with a slow, fast-diffusing inhibitor v',
  citation: 'R. FitzHugh, Biophys. J. 1 (1961) 445–466; J. Nagumo, S. Arimoto & S. Yoshizawa, Proc. IRE 50 (1962) 2061–2070',
  species: ['u', 'v'],
  reactions: { u: 'u - u^3 - v', v: 'epsilon*(u - a1*v - a0)' },
  parameters: {
    epsilon: { default: 5, description: 'rate of v relative to u' },
    a0: { default: 0, description: 'offset' },
    a1: { default: 0.5, description: 'self-decay of v' },
  },
  diffusion: { u: 0.00028, v: 0.005 },
  steadyStates: ({ a0, a1 }) => {
    if (a1 === 0) return [[a0, a0 - a0 * a0 * a0]];
    return realCubicRoots(1, 0, 1 / a1 - 1, -a0 / a1).map((u) => [u, (u - a0) / a1]);
  },
  suggestedStep: 0.01,
};
