import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Lengyel–Epstein model of the CDIMA reaction, non-dimensional form:
 * u_t = a − u − 4uv/(1 + u²) + Δu, v_t = σ[b(u − uv/(1 + u²)) + d Δv].
 * Steady state u₀ = a/5, v₀ = 1 + u₀².
 */
export const lengyelEpstein: KineticsModel = {
  name: 'lengyel-epstein',
  title: 'Lengyel–Epstein',
  description: 'chlorite–iodide–malonic acid reaction; the first chemical Turing patterns',
  citation: 'I. Lengyel & I. R. Epstein, Science 251 (1991) 650–652; Proc. Natl Acad. Sci. USA 89 (1992) 3977–3979',
  species: ['u', 'v'],
  reactions: { u: 'a - u - 4*u*v/(1 + u^2)', v: 'sigma*b*(u - u*v/(1 + u^2))' },
  parameters: {
    a: { default: 12, description: 'feed of u (iodide)' },
    b: { default: 0.3, description: 'reaction ratio of v (chlorite)' },
    sigma: { default: 50, description: 'slowing of v by the starch complex' },
    d: { default: 1.2, description: 'diffusion ratio' },
    scale: { default: 0.001, description: 'diffusion of u relative to the surface size' },
  },
  diffusion: { u: 'scale', v: 'scale*sigma*d' },
  steadyStates: ({ a }) => [[a / 5, 1 + (a * a) / 25]],
  suggestedStep: 0.001,
};
