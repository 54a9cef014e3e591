import type { ShapeDefinition } from './ShapeDefinition.ts';
import { spacingFor } from './ShapeDefinition.ts';
import { revolveProfile } from './revolveProfile.ts';

export const capsule: ShapeDefinition = {
  name: 'capsule',
  description: 'cylinder of radius r and length L along z, capped by hemispheres',
  closed: true,
  parameters: {
    r: { default: 0.5, min: 0, exclusiveMin: true, description: 'radius' },
    L: { default: 2, min: 0, description: 'length of the cylindrical part (0: a sphere)' },
  },
  build(p, vertices) {
    const { r, L } = p;
    const quarter = (Math.PI / 2) * r;
    const length = 2 * quarter + L;
    const profile = (s: number): [number, number] => {
      if (s < quarter) {
        const a = s / r;
        return [r * Math.sin(a), -L / 2 - r * Math.cos(a)];
      }
      if (s <= quarter + L) return [r, -L / 2 + (s - quarter)];
      const a = (s - quarter - L) / r;
      return [r * Math.cos(a), L / 2 + r * Math.sin(a)];
    };
    const area = 4 * Math.PI * r * r + 2 * Math.PI * r * L;
    return revolveProfile(profile, length, spacingFor(area, vertices));
  },
};
