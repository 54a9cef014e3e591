import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Schnakenberg kinetics in Murray's non-dimensional form:
 * u_t = γ(a − u + u²v) + Δu, v_t = γ(b − u²v) + d Δv.
 * Steady state u₀ = a + b, v₀ = b/(a + b)².
 */
export const schnakenberg: KineticsModel = {
  name: 'schnakenberg',
  title: 'Schnakenberg',
  description: 'activator-depleted substrate model; γ sets the domain scale, d the diffusion ratio',
  citation: 'J. Schnakenberg, J. Theor. Biol. 81 (1979) 389–400; form of J. D. Murray, Mathematical Biology II, 3rd ed. (2003), ch. 2',
  species: ['u', 'v'],
  reactions: { u: 'gamma*(a - u + u^2*v)', v: 'gamma*(b - u^2*v)' },
  parameters: {
    gamma: { default: 200, description: 'scale (domain size²/diffusion)' },
    a: { default: 0.1, description: 'production of u' },
    b: { default: 0.9, description: 'production of v' },
    d: { default: 10, description: 'diffusion ratio D_v/D_u' },
  },
  diffusion: { u: 1, v: 'd' },
  steadyStates: ({ a, b }) => [[a + b, b / ((a + b) * (a + b))]],
  suggestedStep: 1e-4,
};
