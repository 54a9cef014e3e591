/**
 * Otsu's threshold (N. Otsu, IEEE Trans. Syst. Man Cybern. 9 (1979) 62–66):
 * the value that maximises the between-class variance of a 256-bin histogram,
 * here weighted by each vertex's area (lumped mass) so a refined region does
 * not count more. Returns the mid-range for a constant field.
 */
export function otsuThreshold(values: ArrayLike<number>, weights: ArrayLike<number>, bins = 256): number {
  const n = values.length;
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < n; i++) { if (values[i] < lo) lo = values[i]; if (values[i] > hi) hi = values[i]; }
  if (!(hi > lo)) return 0.5 * (lo + hi);
  const hist = new Float64Array(bins);
  const scale = bins / (hi - lo);
  let total = 0, sum = 0;
  for (let i = 0; i < n; i++) {
    const b = Math.min(bins - 1, Math.floor((values[i] - lo) * scale));
    hist[b] += weights[i];
    total += weights[i];
  }
  for (let b = 0; b < bins; b++) sum += hist[b] * (b + 0.5);
  let w0 = 0, s0 = 0, best = -1, bestBin = bins / 2;
  for (let b = 0; b < bins - 1; b++) {
    w0 += hist[b];
    s0 += hist[b] * (b + 0.5);
    const w1 = total - w0;
    if (w0 <= 0 || w1 <= 0) continue;
    const m0 = s0 / w0, m1 = (sum - s0) / w1;
    const between = w0 * w1 * (m0 - m1) * (m0 - m1);
    if (between > best) { best = between; bestBin = b + 1; }
  }
  return lo + bestBin / scale;
}
