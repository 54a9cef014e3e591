import { smallMatrixEigenvalues, spectralAbscissa } from './smallMatrixEigenvalues.ts';

/**
 * Linear growth rate of a perturbation with Laplacian eigenvalue k² about a
 * homogeneous state: the largest real part of the eigenvalues of J − k²·diag(D)
 * (Murray, Mathematical Biology II, ch. 2; on a surface k² is a Laplace–Beltrami
 * eigenvalue, Chaplain, Ganesh & Graham, J. Math. Biol. 42 (2001)).
 */
export function growthRate(jacobian: readonly number[], diffusion: readonly number[], k2: number): number {
  const n = diffusion.length;
  const a = jacobian.slice();
  for (let i = 0; i < n; i++) a[i * n + i] -= k2 * diffusion[i];
  return spectralAbscissa(a, n);
}

/** Murray's four conditions for two species u, v (d = D_v/D_u). */
export interface TuringConditions {
  /** (i) f_u + g_v < 0 */
  traceNegative: boolean;
  /** (ii) f_u g_v − f_v g_u > 0 */
  determinantPositive: boolean;
  /** (iii) d f_u + g_v > 0 */
  diffusionDriven: boolean;
  /** (iv) (d f_u + g_v)² − 4 d (f_u g_v − f_v g_u) > 0 */
  discriminantPositive: boolean;
}

export interface TuringAnalysis {
  /** the state is unstable to some spatial mode while stable to homogeneous ones */
  unstable: boolean;
  /** unstable at k² = 0 already (no Turing instability: a homogeneous one) */
  unstableWithoutDiffusion: boolean;
  /** unstable at k² = 0 with complex eigenvalues (homogeneous oscillation, Hopf) */
  oscillatory: boolean;
  /** the unstable band of k² (null if none); k2max may be Infinity if some species does not diffuse */
  band: [number, number] | null;
  /** the fastest-growing k² in the band and its rate */
  fastest: { k2: number; rate: number } | null;
  /** two species only */
  conditions?: TuringConditions;
  /** two species only: the critical diffusion ratio d_c = (D_v/D_u) above which the state is Turing-unstable */
  criticalRatio?: number;
}

/**
 * Turing analysis of a homogeneous state with Jacobian J and diffusion D.
 * Two species: Murray's conditions, d_c from d²f_u² + 2(2f_v g_u − f_u g_v)d + g_v² = 0
 * and the band edges from D_u D_v k⁴ − (D_v f_u + D_u g_v)k² + det J = 0 in closed form.
 * Any number of species: the band from the sign of the growth rate on a fine
 * k² grid, edges refined by bisection. The fastest mode by golden-section search.
 */
export function turingAnalysis(jacobian: readonly number[], diffusion: readonly number[]): TuringAnalysis {
  const n = diffusion.length;
  const rate = (k2: number) => growthRate(jacobian, diffusion, k2);
  const a0 = jacobian.slice();
  const lead = smallMatrixEigenvalues(a0, n)[0];
  const r0 = lead[0];
  const unstableWithoutDiffusion = r0 >= 0;
  const oscillatory = unstableWithoutDiffusion && lead[1] !== 0;
  let conditions: TuringConditions | undefined;
  let criticalRatio: number | undefined;
  if (n === 2) {
    const [fu, fv, gu, gv] = a0;
    const det = fu * gv - fv * gu;
    const [Du, Dv] = diffusion;
    const d = Dv / Du;
    conditions = {
      traceNegative: fu + gv < 0,
      determinantPositive: det > 0,
      diffusionDriven: d * fu + gv > 0,
      discriminantPositive: (d * fu + gv) ** 2 - 4 * d * det > 0,
    };
    if (fu !== 0) {
      const b = 2 * (2 * fv * gu - fu * gv);
      const disc = b * b - 4 * fu * fu * gv * gv;
      if (disc >= 0) {
        const roots = [(-b + Math.sqrt(disc)) / (2 * fu * fu), (-b - Math.sqrt(disc)) / (2 * fu * fu)].filter((x) => x > 0 && x * fu + gv > 0);
        if (roots.length) criticalRatio = Math.min(...roots);
      }
    }
  }
  if (unstableWithoutDiffusion) {
    return { unstable: false, unstableWithoutDiffusion, oscillatory, band: null, fastest: null, conditions, criticalRatio };
  }
  let band: [number, number] | null = null;
  if (n === 2 && diffusion[0] > 0 && diffusion[1] > 0) {
    const [fu, fv, gu, gv] = a0;
    const [Du, Dv] = diffusion;
    const B = Dv * fu + Du * gv, C = fu * gv - fv * gu, A = Du * Dv;
    const disc = B * B - 4 * A * C;
    if (B > 0 && disc > 0) {
      const s = Math.sqrt(disc);
      band = [(B - s) / (2 * A), (B + s) / (2 * A)];
    }
  } else {
    let jmax = 0;
    for (const x of a0) jmax = Math.max(jmax, Math.abs(x));
    const dPos = diffusion.filter((d) => d > 0);
    const top = dPos.length ? (8 * n * Math.max(jmax, 1e-12)) / Math.min(...dPos) : 1;
    const samples = 4000;
    let prev = 0, prevRate = r0;
    let lo = -1, hi = -1;
    for (let s = 1; s <= samples; s++) {
      const k2 = top * Math.pow(10, -10 * (1 - s / samples));
      const r = rate(k2);
      if (prevRate < 0 && r >= 0 && lo < 0) lo = bisectEdge(rate, prev, k2);
      if (prevRate >= 0 && r < 0 && lo >= 0 && hi < 0) hi = bisectEdge(rate, prev, k2);
      prev = k2;
      prevRate = r;
    }
    if (lo >= 0) band = [lo, hi >= 0 ? hi : dPos.length === n ? top : Infinity];
  }
  let fastest: TuringAnalysis['fastest'] = null;
  if (band) {
    const upper = Number.isFinite(band[1]) ? band[1] : band[0] * 1e6 + 1;
    // coarse scan, then golden section around the best sample
    let best = band[0], bestRate = -Infinity;
    const m = 400;
    for (let s = 0; s <= m; s++) {
      const k2 = band[0] + ((upper - band[0]) * s) / m;
      const r = rate(k2);
      if (r > bestRate) { bestRate = r; best = k2; }
    }
    let a = Math.max(band[0], best - (upper - band[0]) / m), b = Math.min(upper, best + (upper - band[0]) / m);
    const g = (Math.sqrt(5) - 1) / 2;
    for (let it = 0; it < 80; it++) {
      const c = b - g * (b - a), d = a + g * (b - a);
      if (rate(c) > rate(d)) b = d; else a = c;
    }
    const k2 = 0.5 * (a + b);
    fastest = { k2, rate: rate(k2) };
  }
  return { unstable: band !== null, unstableWithoutDiffusion, oscillatory, band, fastest, conditions, criticalRatio };
}

/** The k² where `rate` changes sign between lo and hi. */
function bisectEdge(rate: (k2: number) => number, lo: number, hi: number): number {
  const sLo = rate(lo) >= 0;
  for (let i = 0; i < 100; i++) {
    const mid = 0.5 * (lo + hi);
    if ((rate(mid) >= 0) === sLo) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}
