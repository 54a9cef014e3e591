import type { KineticsModel } from '../KineticsModel.ts';

/**
 * Gierer–Meinhardt activator–inhibitor with saturation, non-dimensional form
 * (Murray, Mathematical Biology II, ch. 2): u_t = γ(a − bu + u²/(v(1 + κu²))) + Δu,
 * v_t = γ(u² − v) + d Δv. Steady state: v₀ = u₀², with u₀ the unique positive
 * root of a − bu + 1/(1 + κu²) = 0 (closed form u₀ = (a + 1)/b when κ = 0; the
 * left side decreases in u, so bisection finds it exactly otherwise).
 */
export const giererMeinhardt: KineticsModel = {
  name: 'gierer-meinhardt',
  title: 'Gierer–Meinhardt',
  description: 'short-range activator u, long-range inhibitor v, optional activator saturation κ',
  citation: 'A. Gierer & H. Meinhardt, Kybernetik 12 (1972) 30–39; form of Murray, Mathematical Biology II, ch. 2',
  species: ['u', 'v'],
  reactions: { u: 'gamma*(a - b*u + u^2/(v*(1 + kappa*u^2)))', v: 'gamma*(u^2 - v)' },
  parameters: {
    gamma: { default: 100, description: 'scale (domain size²/diffusion)' },
    a: { default: 0.1, description: 'basal activator production' },
    b: { default: 1, description: 'activator decay' },
    kappa: { default: 0, description: 'activator saturation (0: none)' },
    d: { default: 40, description: 'diffusion ratio D_v/D_u' },
  },
  diffusion: { u: 1, v: 'd' },
  steadyStates: ({ a, b, kappa }) => {
    if (!(b > 0)) return [];
    if (kappa === 0) {
      const u = (a + 1) / b;
      return u > 0 ? [[u, u * u]] : [];
    }
    const g = (u: number) => a - b * u + 1 / (1 + kappa * u * u);
    let lo = 0, hi = (Math.abs(a) + 1) / b + 1;
    if (!(g(lo) > 0 && g(hi) < 0)) return [];
    for (let i = 0; i < 200; i++) {
      const mid = 0.5 * (lo + hi);
      if (g(mid) > 0) lo = mid; else hi = mid;
    }
    const u = 0.5 * (lo + hi);
    return [[u, u * u]];
  },
  suggestedStep: 1e-4,
};
