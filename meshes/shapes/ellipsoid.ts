import { makeMesh } from '../../solver/mesh/Mesh.ts';
import type { ShapeDefinition } from './ShapeDefinition.ts';
import { icosphere, icosphereFrequencyFor } from './icosphere.ts';

export const ellipsoid: ShapeDefinition = {
  name: 'ellipsoid',
  description: 'ellipsoid with semi-axes a, b, c along x, y, z (a stretched geodesic sphere)',
  closed: true,
  parameters: {
    a: { default: 1.5, min: 0, exclusiveMin: true, description: 'semi-axis along x' },
    b: { default: 1, min: 0, exclusiveMin: true, description: 'semi-axis along y' },
    c: { default: 0.75, min: 0, exclusiveMin: true, description: 'semi-axis along z' },
  },
  build(p, vertices) {
    const s = icosphere(icosphereFrequencyFor(vertices), 1);
    const pos = s.positions;
    for (let i = 0; i < pos.length; i += 3) {
      pos[i] *= p.a;
      pos[i + 1] *= p.b;
      pos[i + 2] *= p.c;
    }
    return makeMesh(pos, s.triangles);
  },
};
