import { makeMesh } from '../../solver/mesh/Mesh.ts';
import type { ShapeDefinition } from './ShapeDefinition.ts';

export const patch: ShapeDefinition = {
  name: 'patch',
  description: 'flat rectangle [0, a] × [0, b] in the z = 0 plane (open, no-flux edges), criss-cross grid',
  closed: false,
  parameters: {
    a: { default: 2, min: 0, exclusiveMin: true, description: 'side along x' },
    b: { default: 1, min: 0, exclusiveMin: true, description: 'side along y' },
    cells: { default: 0, min: 0, integer: true, description: 'grid cells along the shorter side; 0 = from the vertex target' },
  },
  build(p, vertices) {
    const short = Math.min(p.a, p.b);
    const h = p.cells > 0 ? short / p.cells : Math.sqrt((p.a * p.b) / Math.max(4, vertices));
    const nx = Math.max(1, Math.round(p.a / h));
    const ny = Math.max(1, Math.round(p.b / h));
    return rectangleGrid(p.a, p.b, nx, ny);
  },
};

/**
 * (nx+1)(ny+1) grid on [0, a] × [0, b]; each cell split by the diagonal that
 * alternates in a checkerboard, so the mesh has no preferred diagonal direction.
 */
export function rectangleGrid(a: number, b: number, nx: number, ny: number) {
  const positions = new Float64Array(3 * (nx + 1) * (ny + 1));
  for (let j = 0; j <= ny; j++)
    for (let i = 0; i <= nx; i++) {
      const v = j * (nx + 1) + i;
      positions[3 * v] = (a * i) / nx;
      positions[3 * v + 1] = (b * j) / ny;
    }
  const triangles = new Uint32Array(6 * nx * ny);
  let t = 0;
  for (let j = 0; j < ny; j++)
    for (let i = 0; i < nx; i++) {
      const v00 = j * (nx + 1) + i, v10 = v00 + 1, v01 = v00 + nx + 1, v11 = v01 + 1;
      if ((i + j) % 2 === 0) {
        triangles.set([v00, v10, v11, v00, v11, v01], t);
      } else {
        triangles.set([v00, v10, v01, v10, v11, v01], t);
      }
      t += 6;
    }
  return makeMesh(positions, triangles);
}
