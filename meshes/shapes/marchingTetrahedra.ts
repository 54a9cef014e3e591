import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';

/** A scalar field sampled on a regular grid: nx·ny·nz values, x fastest, at origin + (i, j, k)·spacing. */
export interface GridField {
  values: Float32Array | Float64Array;
  nx: number;
  ny: number;
  nz: number;
  origin: [number, number, number];
  spacing: number;
}

/** The six tetrahedra of a cube around its main diagonal 0–7 (corner bits: x 1, y 2, z 4): the same split in every cube, so faces match. */
const TETS = [[0, 1, 3, 7], [0, 3, 2, 7], [0, 2, 6, 7], [0, 6, 4, 7], [0, 4, 5, 7], [0, 5, 1, 7]];

/**
 * The surface where a sampled field crosses zero (inside > 0), by marching
 * tetrahedra: each grid cube split into six tetrahedra, each tetrahedron cut
 * by one or two triangles whose corners lie on its edges at the linearly
 * interpolated zero. Corners on a shared grid edge are shared, so the result
 * is a welded, closed, consistently oriented (outward) surface when the field
 * is negative on the grid's border. Like the meshes that segmentation tools
 * make from microscope stacks, it is full of slivers and terraces.
 */
export function marchingTetrahedra(field: GridField): Mesh {
  const { nx, ny, nz, origin, spacing: h } = field;
  const g = (i: number) => (field.values[i] === 0 ? 1e-12 : field.values[i]); // no corner exactly on the surface
  const index = (i: number, j: number, k: number) => i + nx * (j + ny * k);
  const points: number[] = [];
  const triangles: number[] = [];
  const onEdge = new Map<number, number>();
  const total = nx * ny * nz;
  const position = (q: number, out: number[]) => {
    const i = q % nx, j = Math.floor(q / nx) % ny, k = Math.floor(q / (nx * ny));
    out[0] = origin[0] + i * h; out[1] = origin[1] + j * h; out[2] = origin[2] + k * h;
  };
  const pa = [0, 0, 0], pb = [0, 0, 0];
  /** the vertex where the field crosses zero on the grid edge a–b */
  const cut = (a: number, b: number): number => {
    const key = Math.min(a, b) * total + Math.max(a, b);
    const known = onEdge.get(key);
    if (known !== undefined) return known;
    const ga = g(a), gb = g(b);
    const t = Math.min(1 - 1e-4, Math.max(1e-4, ga / (ga - gb)));
    position(a, pa); position(b, pb);
    const v = points.length / 3;
    points.push(pa[0] + t * (pb[0] - pa[0]), pa[1] + t * (pb[1] - pa[1]), pa[2] + t * (pb[2] - pa[2]));
    onEdge.set(key, v);
    return v;
  };
  /** a triangle, turned so its normal points from the inside corners to the outside ones */
  const emit = (u: number, v: number, w: number, inside: number[], outside: number[]) => {
    const P = points;
    const ux = P[3 * v] - P[3 * u], uy = P[3 * v + 1] - P[3 * u + 1], uz = P[3 * v + 2] - P[3 * u + 2];
    const vx = P[3 * w] - P[3 * u], vy = P[3 * w + 1] - P[3 * u + 1], vz = P[3 * w + 2] - P[3 * u + 2];
    const n = [uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx];
    const d = [0, 0, 0];
    for (const q of outside) { position(q, pa); for (let c = 0; c < 3; c++) d[c] += pa[c] / outside.length; }
    for (const q of inside) { position(q, pa); for (let c = 0; c < 3; c++) d[c] -= pa[c] / inside.length; }
    if (n[0] * d[0] + n[1] * d[1] + n[2] * d[2] >= 0) triangles.push(u, v, w);
    else triangles.push(u, w, v);
  };
  const corner = new Array<number>(8);
  for (let k = 0; k + 1 < nz; k++) {
    for (let j = 0; j + 1 < ny; j++) {
      for (let i = 0; i + 1 < nx; i++) {
        let any = false, all = true;
        for (let c = 0; c < 8; c++) {
          corner[c] = index(i + (c & 1), j + ((c >> 1) & 1), k + ((c >> 2) & 1));
          const inside = g(corner[c]) > 0;
          any ||= inside; all &&= inside;
        }
        if (!any || all) continue;
        for (const tet of TETS) {
          const q = tet.map((c) => corner[c]);
          const inside = q.filter((x) => g(x) > 0), outside = q.filter((x) => g(x) <= 0);
          if (inside.length === 0 || inside.length === 4) continue;
          if (inside.length === 1 || inside.length === 3) {
            const [lone, others] = inside.length === 1 ? [inside[0], outside] : [outside[0], inside];
            emit(cut(lone, others[0]), cut(lone, others[1]), cut(lone, others[2]), inside, outside);
          } else {
            const [a, b] = inside, [c, d] = outside;
            const ac = cut(a, c), ad = cut(a, d), bd = cut(b, d), bc = cut(b, c);
            emit(ac, ad, bd, inside, outside);
            emit(ac, bd, bc, inside, outside);
          }
        }
      }
    }
  }
  return makeMesh(Float64Array.from(points), Uint32Array.from(triangles));
}
