import type { Mesh } from '../mesh/Mesh.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';

/**
 * A tangential velocity that expands the surface locally at the areal rate
 * g − ḡ (ḡ its area mean): v = ∇_Γφ with Δ_Γφ = g − ḡ, so div_Γ v = g − ḡ.
 * In P1 terms K φ = M(ḡ − g), solved by Jacobi-preconditioned conjugate
 * gradients (consistent: both sides are orthogonal to the constants); v at a
 * vertex is the area-weighted mean of ∇φ over its triangles. Area moves from
 * where g is low to where it is high; the total is unchanged (natural no-flux
 * condition at open edges), so a surface that should also grow overall
 * combines this with normal or uniform growth.
 */
export function tangentialVelocity(mesh: Mesh, g: ArrayLike<number>, out: Float64Array): void {
  const n = mesh.positions.length / 3;
  const K = cotanStiffness(mesh);
  const m = lumpedMass(mesh);
  let area = 0, gbar = 0;
  for (let i = 0; i < n; i++) { area += m[i]; gbar += m[i] * g[i]; }
  gbar /= area;
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) b[i] = m[i] * (gbar - g[i]);
  const phi = solveSingularSpd(K.rowOffsets, K.columns, K.values, b);
  // per-triangle gradient, area-weighted onto vertices
  const p = mesh.positions, tri = mesh.triangles;
  out.fill(0);
  const weight = new Float64Array(n);
  for (let t = 0; t < tri.length; t += 3) {
    const ia = tri[t], ib = tri[t + 1], ic = tri[t + 2];
    const a = 3 * ia, bb = 3 * ib, c = 3 * ic;
    const e1 = [p[bb] - p[a], p[bb + 1] - p[a + 1], p[bb + 2] - p[a + 2]];
    const e2 = [p[c] - p[a], p[c + 1] - p[a + 1], p[c + 2] - p[a + 2]];
    const N = [e1[1] * e2[2] - e1[2] * e2[1], e1[2] * e2[0] - e1[0] * e2[2], e1[0] * e2[1] - e1[1] * e2[0]];
    const twoA = Math.hypot(N[0], N[1], N[2]);
    if (twoA === 0) continue;
    const nx = N[0] / twoA, ny = N[1] / twoA, nz = N[2] / twoA;
    // ∇λ_k = n × e_k / (2A), e_k the edge opposite corner k, counter-clockwise
    const grad = [0, 0, 0];
    const corners = [[ia, ib, ic], [ib, ic, ia], [ic, ia, ib]];
    for (const [k, j, l] of corners) {
      const ex = p[3 * l] - p[3 * j], ey = p[3 * l + 1] - p[3 * j + 1], ez = p[3 * l + 2] - p[3 * j + 2];
      const f = phi[k] / twoA;
      grad[0] += f * (ny * ez - nz * ey);
      grad[1] += f * (nz * ex - nx * ez);
      grad[2] += f * (nx * ey - ny * ex);
    }
    const w = twoA / 2;
    for (const v of [ia, ib, ic]) {
      out[3 * v] += w * grad[0]; out[3 * v + 1] += w * grad[1]; out[3 * v + 2] += w * grad[2];
      weight[v] += w;
    }
  }
  for (let i = 0; i < n; i++) if (weight[i] > 0) for (let d = 0; d < 3; d++) out[3 * i + d] /= weight[i];
}

/** Jacobi-PCG for a symmetric positive semi-definite CSR system with a consistent right-hand side. */
function solveSingularSpd(ro: Uint32Array, ci: Uint32Array, va: Float64Array, b: Float64Array, tol = 1e-10, maxIt = 5000): Float64Array {
  const n = b.length;
  const x = new Float64Array(n), r = Float64Array.from(b), z = new Float64Array(n), p = new Float64Array(n), q = new Float64Array(n), dinv = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let k = ro[i]; k < ro[i + 1]; k++) if (ci[k] === i) dinv[i] = va[k] > 0 ? 1 / va[k] : 0;
  let bb = 0, rz = 0;
  for (let i = 0; i < n; i++) { bb += b[i] * b[i]; z[i] = dinv[i] * r[i]; p[i] = z[i]; rz += r[i] * z[i]; }
  if (bb === 0) return x;
  for (let it = 0; it < maxIt; it++) {
    let pq = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = ro[i]; k < ro[i + 1]; k++) s += va[k] * p[ci[k]];
      q[i] = s;
      pq += p[i] * s;
    }
    if (pq <= 0) break;
    const alpha = rz / pq;
    let rr = 0, rzNew = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      r[i] -= alpha * q[i];
      rr += r[i] * r[i];
      z[i] = dinv[i] * r[i];
      rzNew += r[i] * z[i];
    }
    if (rr <= tol * tol * bb) break;
    const beta = rzNew / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
  }
  return x;
}
