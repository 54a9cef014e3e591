import type { ShapeDefinition } from './ShapeDefinition.ts';
import { spacingFor } from './ShapeDefinition.ts';
import { loftRings, ringCount, ROW_SPACING, type Ring } from './loftRings.ts';

export const torus: ShapeDefinition = {
  name: 'torus',
  description: 'torus of revolution about z: tube radius r swept around a circle of radius R',
  closed: true,
  parameters: {
    R: { default: 1, min: 0, exclusiveMin: true, description: 'radius of the centre circle' },
    r: { default: 0.4, min: 0, exclusiveMin: true, description: 'tube radius (< R)' },
  },
  check: (p) => (p.r < p.R ? null : `tube radius r = ${p.r} must be smaller than R = ${p.R}`),
  build(p, vertices) {
    const h = spacingFor(4 * Math.PI * Math.PI * p.R * p.r, vertices);
    const nMinor = ringCount(2 * Math.PI * p.r, h, 3);
    let nMajor = ringCount((2 * Math.PI * p.R) / ROW_SPACING, h, 3);
    if (nMajor % 2) nMajor++; // even, so the staggering closes up
    const rings: Ring[] = [];
    for (let k = 0; k < nMajor; k++) {
      const phi = (2 * Math.PI * k) / nMajor;
      const phase = (k % 2) * 0.5;
      const pts = new Float64Array(3 * nMinor);
      for (let i = 0; i < nMinor; i++) {
        const th = (2 * Math.PI * (i + phase)) / nMinor;
        const rho = p.R + p.r * Math.cos(th);
        pts[3 * i] = rho * Math.cos(phi);
        pts[3 * i + 1] = rho * Math.sin(phi);
        pts[3 * i + 2] = p.r * Math.sin(th);
      }
      rings.push({ points: pts, phase });
    }
    return loftRings(rings, { periodic: true });
  },
};
