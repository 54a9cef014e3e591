import type { ShapeDefinition } from './ShapeDefinition.ts';
import { spacingFor } from './ShapeDefinition.ts';
import { revolveProfile } from './revolveProfile.ts';

export const dome: ShapeDefinition = {
  name: 'dome',
  description: 'open spherical cap of radius R around +z, from the pole down to polar angle `angle` (degrees)',
  closed: false,
  parameters: {
    R: { default: 1, min: 0, exclusiveMin: true, description: 'sphere radius' },
    angle: { default: 90, min: 0, max: 180, exclusiveMin: true, description: 'opening polar angle in degrees (90: hemisphere)' },
  },
  check: (p) => (p.angle < 180 ? null : 'angle must be below 180 degrees (180 would close the sphere: use `sphere`)'),
  build(p, vertices) {
    const theta = (p.angle * Math.PI) / 180;
    const area = 2 * Math.PI * p.R * p.R * (1 - Math.cos(theta));
    const profile = (s: number): [number, number] => [p.R * Math.sin(s / p.R), p.R * Math.cos(s / p.R)];
    return revolveProfile(profile, p.R * theta, spacingFor(area, vertices));
  },
};
