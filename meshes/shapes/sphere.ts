import type { ShapeDefinition } from './ShapeDefinition.ts';
import { icosphere, icosphereFrequencyFor } from './icosphere.ts';

export const sphere: ShapeDefinition = {
  name: 'sphere',
  description: 'geodesic sphere from a subdivided icosahedron (near-uniform triangles)',
  closed: true,
  parameters: {
    radius: { default: 1, min: 0, exclusiveMin: true, description: 'radius' },
    frequency: {
      default: 0, min: 0, integer: true,
      description: 'icosahedron edge subdivisions ν (nV = 10ν²+2); 0 = choose from the vertex target',
    },
  },
  build(p, vertices) {
    const nu = p.frequency > 0 ? p.frequency : icosphereFrequencyFor(vertices);
    return icosphere(nu, p.radius);
  },
};
