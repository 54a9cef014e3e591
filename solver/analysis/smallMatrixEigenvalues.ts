/** A complex number as [re, im]. */
export type Complex = [number, number];

/**
 * Eigenvalues of a small dense real matrix (row-major n×n, n ≤ 8), for the
 * linear stability of kinetics with a handful of species. 2×2 in closed form;
 * larger: the characteristic polynomial by the Faddeev–LeVerrier recursion,
 * its roots by the Weierstrass (Durand–Kerner) iteration, each polished by
 * Newton steps. Sorted by decreasing real part.
 */
export function smallMatrixEigenvalues(a: ArrayLike<number>, n: number): Complex[] {
  if (n === 1) return [[a[0], 0]];
  if (n === 2) {
    const tr = a[0] + a[3], det = a[0] * a[3] - a[1] * a[2];
    const disc = tr * tr - 4 * det;
    if (disc >= 0) {
      const s = Math.sqrt(disc);
      // stable form of the quadratic roots
      const q = tr >= 0 ? (tr + s) / 2 : (tr - s) / 2;
      const r1 = q, r2 = q !== 0 ? det / q : 0;
      return [[Math.max(r1, r2), 0], [Math.min(r1, r2), 0]];
    }
    const im = Math.sqrt(-disc) / 2;
    return [[tr / 2, im], [tr / 2, -im]];
  }
  // Faddeev–LeVerrier: p(x) = xⁿ + c[n−1]xⁿ⁻¹ + … + c[0]
  const c = new Array<number>(n + 1).fill(0);
  c[n] = 1;
  let m = new Float64Array(n * n); // M_0 = 0
  for (let k = 1; k <= n; k++) {
    const next = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let l = 0; l < n; l++) s += a[i * n + l] * m[l * n + j];
        next[i * n + j] = s + (i === j ? c[n - k + 1] : 0);
      }
    }
    m = next;
    let tr = 0;
    for (let i = 0; i < n; i++) for (let l = 0; l < n; l++) tr += a[i * n + l] * m[l * n + i];
    c[n - k] = -tr / k;
  }
  const evalPoly = (z: Complex): Complex => {
    let re = 1, im = 0;
    for (let k = n - 1; k >= 0; k--) {
      const r = re * z[0] - im * z[1] + c[k];
      im = re * z[1] + im * z[0];
      re = r;
    }
    return [re, im];
  };
  const div = (x: Complex, y: Complex): Complex => {
    const d = y[0] * y[0] + y[1] * y[1];
    return [(x[0] * y[0] + x[1] * y[1]) / d, (x[1] * y[0] - x[0] * y[1]) / d];
  };
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i]));
  scale = Math.max(scale * n, 1e-300);
  const roots: Complex[] = Array.from({ length: n }, (_, k) => {
    const angle = (2 * Math.PI * k) / n + 0.4;
    return [scale * 0.9 * Math.cos(angle), scale * 0.9 * Math.sin(angle)];
  });
  for (let iter = 0; iter < 500; iter++) {
    let moved = 0;
    for (let i = 0; i < n; i++) {
      let den: Complex = [1, 0];
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const d: Complex = [roots[i][0] - roots[j][0], roots[i][1] - roots[j][1]];
        den = [den[0] * d[0] - den[1] * d[1], den[0] * d[1] + den[1] * d[0]];
      }
      if (den[0] === 0 && den[1] === 0) den = [1e-300, 0];
      const step = div(evalPoly(roots[i]), den);
      roots[i] = [roots[i][0] - step[0], roots[i][1] - step[1]];
      moved = Math.max(moved, Math.hypot(step[0], step[1]) / Math.max(1, Math.hypot(roots[i][0], roots[i][1])));
    }
    if (moved < 1e-15) break;
  }
  // roots of a real polynomial: snap tiny imaginary parts
  for (const r of roots) if (Math.abs(r[1]) < 1e-10 * Math.max(1, Math.abs(r[0]))) r[1] = 0;
  return roots.sort((x, y) => y[0] - x[0] || y[1] - x[1]);
}

/** Largest real part of the eigenvalues (the linear growth rate). */
export function spectralAbscissa(a: ArrayLike<number>, n: number): number {
  return smallMatrixEigenvalues(a, n)[0][0];
}
