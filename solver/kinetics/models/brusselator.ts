import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Brusselator: u_t = a − (b + 1)u + u²v + D_u Δu, v_t = bu − u²v + D_v Δv.
 * Steady state (a, b/a).
 */
export const brusselator: KineticsModel = {
  name: 'brusselator',
  title: 'Brusselator',
  description: 'trimolecular autocatalytic oscillator; Turing patterns when D_v/D_u is large',
  citation: 'I. Prigogine & R. Lefever, J. Chem. Phys. 48 (1968) 1695–1700',
  species: ['u', 'v'],
  reactions: { u: 'a - (b + 1)*u + u^2*v', v: 'b*u - u^2*v' },
  parameters: {
    a: { default: 3, description: 'input of u' },
    b: { default: 9, description: 'conversion rate of u into v' },
  },
  diffusion: { u: 0.0025, v: 0.02 },
  steadyStates: ({ a, b }) => (a !== 0 ? [[a, b / a]] : []),
  suggestedStep: 0.005,
};
