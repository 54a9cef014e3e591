import { symmetricEigen } from '../linalg/symmetricEigen.ts';
import { weightedCentroid } from '../mesh/weightedCentroid.ts';

/** The class of global map fitted before a non-rigid registration. */
export type Alignment = 'none' | 'rigid' | 'similarity' | 'affine';

/** x ↦ matrix·x + shift (matrix 3×3, row-major). */
export interface AffineMap {
  matrix: number[];
  shift: [number, number, number];
}

export const IDENTITY_MAP: AffineMap = { matrix: [1, 0, 0, 0, 1, 0, 0, 0, 1], shift: [0, 0, 0] };

/** Apply an affine map to packed points (`out` may be `x`). */
export function applyAffine(m: AffineMap, x: Float64Array, out: Float64Array): Float64Array {
  const [a, b, c, d, e, f, g, h, k] = m.matrix, [s0, s1, s2] = m.shift;
  for (let i = 0; i < x.length; i += 3) {
    const u = x[i], v = x[i + 1], w = x[i + 2];
    out[i] = a * u + b * v + c * w + s0;
    out[i + 1] = d * u + e * v + f * w + s1;
    out[i + 2] = g * u + h * v + k * w + s2;
  }
  return out;
}

export function determinant3(m: readonly number[]): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
}

/**
 * The map of a class taking points p onto points q best in weighted least
 * squares: rigid or similarity by unit quaternions (Horn, J. Opt. Soc. Am. A
 * 4 (1987) 629), affine by the normal equations of the 3×3 matrix about the
 * centroids. p, q: packed xyz of the same length; w: one weight per pair.
 */
export function bestAlignment(p: Float64Array, q: Float64Array, w: Float64Array, kind: Exclude<Alignment, 'none'>): AffineMap {
  const cp = weightedCentroid(p, w), cq = weightedCentroid(q, w);
  // S = Σ w (p − cp)(q − cq)ᵀ and P = Σ w (p − cp)(p − cp)ᵀ
  const S = new Float64Array(9), P = new Float64Array(9);
  let sq = 0;
  for (let i = 0; i < w.length; i++) {
    const wi = w[i];
    if (wi === 0) continue;
    const a0 = p[3 * i] - cp[0], a1 = p[3 * i + 1] - cp[1], a2 = p[3 * i + 2] - cp[2];
    const b0 = q[3 * i] - cq[0], b1 = q[3 * i + 1] - cq[1], b2 = q[3 * i + 2] - cq[2];
    S[0] += wi * a0 * b0; S[1] += wi * a0 * b1; S[2] += wi * a0 * b2;
    S[3] += wi * a1 * b0; S[4] += wi * a1 * b1; S[5] += wi * a1 * b2;
    S[6] += wi * a2 * b0; S[7] += wi * a2 * b1; S[8] += wi * a2 * b2;
    P[0] += wi * a0 * a0; P[1] += wi * a0 * a1; P[2] += wi * a0 * a2;
    P[4] += wi * a1 * a1; P[5] += wi * a1 * a2; P[8] += wi * a2 * a2;
    sq += wi * (b0 * b0 + b1 * b1 + b2 * b2);
  }
  P[3] = P[1]; P[6] = P[2]; P[7] = P[5];
  let matrix: number[];
  if (kind === 'affine') {
    // Aᵀ = P⁻¹ S
    const det = determinant3(Array.from(P));
    const inv = [
      P[4] * P[8] - P[5] * P[7], P[2] * P[7] - P[1] * P[8], P[1] * P[5] - P[2] * P[4],
      P[5] * P[6] - P[3] * P[8], P[0] * P[8] - P[2] * P[6], P[2] * P[3] - P[0] * P[5],
      P[3] * P[7] - P[4] * P[6], P[1] * P[6] - P[0] * P[7], P[0] * P[4] - P[1] * P[3],
    ].map((v) => v / det);
    matrix = new Array<number>(9);
    for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) matrix[3 * c + r] = inv[3 * r] * S[c] + inv[3 * r + 1] * S[3 + c] + inv[3 * r + 2] * S[6 + c];
  } else {
    const [xx, xy, xz, yx, yy, yz, zx, zy, zz] = S;
    const N = Float64Array.from([
      xx + yy + zz, yz - zy, zx - xz, xy - yx,
      yz - zy, xx - yy - zz, xy + yx, zx + xz,
      zx - xz, xy + yx, -xx + yy - zz, yz + zy,
      xy - yx, zx + xz, yz + zy, -xx - yy + zz,
    ]);
    const { vectors } = symmetricEigen(N, 4); // eigenvalues ascending: the last column is the rotation
    const [qw, qx, qy, qz] = [vectors[3], vectors[7], vectors[11], vectors[15]];
    const s = kind === 'similarity' ? Math.sqrt(sq / (P[0] + P[4] + P[8])) : 1;
    matrix = [
      qw * qw + qx * qx - qy * qy - qz * qz, 2 * (qx * qy - qw * qz), 2 * (qx * qz + qw * qy),
      2 * (qy * qx + qw * qz), qw * qw - qx * qx + qy * qy - qz * qz, 2 * (qy * qz - qw * qx),
      2 * (qz * qx - qw * qy), 2 * (qz * qy + qw * qx), qw * qw - qx * qx - qy * qy + qz * qz,
    ].map((v) => s * v);
  }
  const shift = [0, 1, 2].map((r) => cq[r] - (matrix[3 * r] * cp[0] + matrix[3 * r + 1] * cp[1] + matrix[3 * r + 2] * cp[2])) as [number, number, number];
  return { matrix, shift };
}

/** The inverse map. */
export function inverseAffine(m: AffineMap): AffineMap {
  const C = cofactor(m.matrix), det = determinant3(m.matrix);
  // inverse = cofactorᵀ / det
  const matrix = [C[0], C[3], C[6], C[1], C[4], C[7], C[2], C[5], C[8]].map((v) => v / det);
  const t = m.shift;
  const shift = [0, 1, 2].map((r) => -(matrix[3 * r] * t[0] + matrix[3 * r + 1] * t[1] + matrix[3 * r + 2] * t[2])) as [number, number, number];
  return { matrix, shift };
}

/** The cofactor matrix of a 3×3 matrix: it maps normals under x ↦ Mx (det·M⁻ᵀ). */
export function cofactor(M: readonly number[]): number[] {
  return [
    M[4] * M[8] - M[5] * M[7], M[5] * M[6] - M[3] * M[8], M[3] * M[7] - M[4] * M[6],
    M[2] * M[7] - M[1] * M[8], M[0] * M[8] - M[2] * M[6], M[1] * M[6] - M[0] * M[7],
    M[1] * M[5] - M[2] * M[4], M[2] * M[3] - M[0] * M[5], M[0] * M[4] - M[1] * M[3],
  ];
}
