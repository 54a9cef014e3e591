import type { Mesh } from '../../solver/mesh/Mesh.ts';
import type { ShapeDefinition } from './ShapeDefinition.ts';
import { buildToVertexCount } from './ShapeDefinition.ts';
import { loftRings, ringCount, ROW_SPACING, type Ring } from './loftRings.ts';

/**
 * Spiral shell: a circular tube swept along a logarithmic helico-spiral around the
 * z axis. The centre line is r(θ) = size·W^(θ/2π) from the axis, dropping by
 * `spire`·r along −z; the tube radius is `tubeRatio`·r, so every turn is the
 * previous one scaled by the whorl expansion rate W. The apex is closed, the
 * aperture (at θ = 0, distance `size`) is an open boundary.
 */
export const spiralShell: ShapeDefinition = {
  name: 'spiral-shell',
  description: 'tube swept along a logarithmic spiral, closed apex, open aperture',
  closed: false,
  parameters: {
    whorls: { default: 2.5, min: 0.25, description: 'number of turns from apex to aperture' },
    expansion: { default: 2, min: 1, exclusiveMin: true, description: 'whorl expansion rate W: linear size factor per turn' },
    tubeRatio: { default: 0.3, min: 0, exclusiveMin: true, description: 'tube radius / distance of the tube centre from the axis' },
    spire: { default: 0.6, min: 0, description: 'drop along −z per unit distance from the axis (0: flat coil)' },
    size: { default: 1, min: 0, exclusiveMin: true, description: 'distance of the aperture centre from the axis' },
  },
  check(p) {
    const W = p.expansion;
    const limit = ((W - 1) * Math.sqrt(1 + p.spire * p.spire)) / (1 + W);
    if (p.tubeRatio >= 0.98 * limit) {
      return `tubeRatio ${p.tubeRatio} makes each whorl overlap the previous one; with expansion ${W} and spire ${p.spire} it must stay below ${(0.98 * limit).toFixed(3)}`;
    }
    return null;
  },
  build(p, vertices) {
    const k = Math.log(p.expansion) / (2 * Math.PI);
    const th0 = -2 * Math.PI * p.whorls;
    const speed = Math.sqrt(1 + k * k * (1 + p.spire * p.spire));
    const area = 2 * Math.PI * p.tubeRatio * p.size * p.size * speed * ((1 - Math.exp(2 * k * th0)) / (2 * k));
    return buildToVertexCount((h) => buildShell(p, h), area, vertices);
  },
};

function buildShell(p: Record<string, number>, h: number): Mesh {
  const k = Math.log(p.expansion) / (2 * Math.PI);
  const th0 = -2 * Math.PI * p.whorls;
  const r = (th: number) => p.size * Math.exp(k * th);
  const centre = (th: number) => [r(th) * Math.cos(th), r(th) * Math.sin(th), -p.spire * r(th)];
  const frame = (th: number) => {
    const c = Math.cos(th), s = Math.sin(th);
    const t = [k * c - s, k * s + c, -p.spire * k];
    const tl = Math.hypot(t[0], t[1], t[2]);
    for (let i = 0; i < 3; i++) t[i] /= tl;
    const rad = [c, s, 0];
    const d = rad[0] * t[0] + rad[1] * t[1];
    const nrm = [rad[0] - d * t[0], rad[1] - d * t[1], -d * t[2]];
    const nl = Math.hypot(nrm[0], nrm[1], nrm[2]);
    for (let i = 0; i < 3; i++) nrm[i] /= nl;
    const b = [t[1] * nrm[2] - t[2] * nrm[1], t[2] * nrm[0] - t[0] * nrm[2], t[0] * nrm[1] - t[1] * nrm[0]];
    return { t, n: nrm, b };
  };
  const speed = (th: number) => r(th) * Math.sqrt(1 + k * k * (1 + p.spire * p.spire));
  const local = (th: number) => Math.min(h, (2 * Math.PI * p.tubeRatio * r(th)) / 6);
  // march stations from apex to aperture, then stretch them to end exactly at θ = 0
  const stations: number[] = [th0];
  let th = th0;
  while (th < 0) {
    th += (local(th) * ROW_SPACING) / speed(th);
    stations.push(th);
  }
  const last = stations[stations.length - 1];
  for (let i = 0; i < stations.length; i++) stations[i] = th0 + ((stations[i] - th0) * (0 - th0)) / (last - th0);
  const rings: Ring[] = [];
  stations.forEach((st, idx) => {
    const rho = p.tubeRatio * r(st);
    const n = ringCount(2 * Math.PI * rho, local(st), 6);
    const phase = (idx % 2) * 0.5;
    const { n: e1, b: e2 } = frame(st);
    const c = centre(st);
    const pts = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const a = (2 * Math.PI * (i + phase)) / n;
      const ca = rho * Math.cos(a), sa = rho * Math.sin(a);
      for (let q = 0; q < 3; q++) pts[3 * i + q] = c[q] + ca * e1[q] + sa * e2[q];
    }
    rings.push({ points: pts, phase });
  });
  const c0 = centre(th0);
  const { t: t0 } = frame(th0);
  const rho0 = p.tubeRatio * r(th0);
  return loftRings(rings, { startPole: [c0[0] - rho0 * t0[0], c0[1] - rho0 * t0[1], c0[2] - rho0 * t0[2]] });
}
