import { makeMesh, type Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';

/**
 * Taubin's λ|μ smoothing (Taubin 1995): each iteration a shrinking step
 * x ← x + λ·Δx and an inflating one x ← x + μ·Δx with the umbrella operator
 * Δx = mean of the neighbours − x. With λ = 0.5 and μ = −0.53 (pass-band
 * k_PB = 1/λ + 1/μ ≈ 0.11) it removes a scan's terraces and noise without
 * the shrinkage of plain Laplacian smoothing. Boundary vertices stay.
 */
export function taubinSmooth(mesh: Mesh, iterations: number, lambda = 0.5, mu = -0.53): Mesh {
  const topo = meshTopology(mesh);
  const off = topo.vertexNeighbourOffsets, nb = topo.vertexNeighbours;
  const n = mesh.positions.length / 3;
  const onBoundary = new Uint8Array(n);
  for (const loop of topo.boundaryLoops) for (const v of loop) onBoundary[v] = 1;
  let x = Float64Array.from(mesh.positions);
  let y = new Float64Array(x.length);
  const step = (factor: number) => {
    for (let v = 0; v < n; v++) {
      const k = off[v + 1] - off[v];
      if (onBoundary[v] || k === 0) { y[3 * v] = x[3 * v]; y[3 * v + 1] = x[3 * v + 1]; y[3 * v + 2] = x[3 * v + 2]; continue; }
      let cx = 0, cy = 0, cz = 0;
      for (let q = off[v]; q < off[v + 1]; q++) { const w = nb[q]; cx += x[3 * w]; cy += x[3 * w + 1]; cz += x[3 * w + 2]; }
      y[3 * v] = x[3 * v] + factor * (cx / k - x[3 * v]);
      y[3 * v + 1] = x[3 * v + 1] + factor * (cy / k - x[3 * v + 1]);
      y[3 * v + 2] = x[3 * v + 2] + factor * (cz / k - x[3 * v + 2]);
    }
    [x, y] = [y, x];
  };
  for (let i = 0; i < iterations; i++) { step(lambda); step(mu); }
  return makeMesh(x, mesh.triangles);
}
