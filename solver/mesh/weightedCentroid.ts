/** Σ wᵢxᵢ / Σ wᵢ of packed points x (one weight per point): with lumped masses, a surface's area centroid. */
export function weightedCentroid(x: ArrayLike<number>, w: ArrayLike<number>): [number, number, number] {
  let s = 0, cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < w.length; i++) { s += w[i]; cx += w[i] * x[3 * i]; cy += w[i] * x[3 * i + 1]; cz += w[i] * x[3 * i + 2]; }
  return [cx / s, cy / s, cz / s];
}
