/**
 * Real roots of a·x³ + b·x² + c·x + d = 0 in ascending order (trigonometric
 * form of Cardano's formula for three roots), falling back to the quadratic
 * when a = 0. Each root is polished by two Newton steps.
 */
export function realCubicRoots(a: number, b: number, c: number, d: number): number[] {
  if (a === 0) {
    if (b === 0) return c === 0 ? [] : [-d / c];
    const disc = c * c - 4 * b * d;
    if (disc < 0) return [];
    const s = Math.sqrt(disc);
    return [(-c - s) / (2 * b), (-c + s) / (2 * b)].sort((x, y) => x - y);
  }
  const B = b / a, C = c / a, D = d / a;
  // depressed cubic t³ + pt + q with x = t − B/3
  const p = C - (B * B) / 3;
  const q = (2 * B * B * B) / 27 - (B * C) / 3 + D;
  const shift = -B / 3;
  let roots: number[];
  const disc = (q * q) / 4 + (p * p * p) / 27;
  if (Math.abs(disc) < 1e-14 * Math.max(1, Math.abs(q * q))) {
    const u = Math.cbrt(-q / 2);
    roots = u === 0 ? [0] : [2 * u, -u];
  } else if (disc > 0) {
    const s = Math.sqrt(disc);
    roots = [Math.cbrt(-q / 2 + s) + Math.cbrt(-q / 2 - s)];
  } else {
    const r = 2 * Math.sqrt(-p / 3);
    const phi = Math.acos(Math.max(-1, Math.min(1, (3 * q) / (p * r))));
    roots = [0, 1, 2].map((k) => r * Math.cos((phi - 2 * Math.PI * k) / 3));
  }
  const f = (x: number) => ((a * x + b) * x + c) * x + d;
  const df = (x: number) => (3 * a * x + 2 * b) * x + c;
  return roots
    .map((t) => {
      let x = t + shift;
      for (let i = 0; i < 2; i++) {
        const g = df(x);
        if (g !== 0) x -= f(x) / g;
      }
      return x;
    })
    .sort((x, y) => x - y);
}
