import { buildToVertexCount, type ShapeDefinition } from './ShapeDefinition.ts';
import { marchingTetrahedra } from './marchingTetrahedra.ts';

/**
 * Occupancy of an imagined organism's limb bud: a flattened paddle (an
 * ellipsoid of semi-axes length/2 × width/2 × thickness/2, its centre at
 * x = length/2 + stalk) joined to a round stalk along x from the origin.
 */
function inBud(x: number, y: number, z: number, p: Record<string, number>): boolean {
  const cx = p.stalk + p.length / 2;
  const e = ((x - cx) / (p.length / 2)) ** 2 + (y / (p.width / 2)) ** 2 + (z / (p.thickness / 2)) ** 2;
  const stalk = x >= 0 && x <= cx && y * y + z * z <= p.radius * p.radius;
  return e <= 1 || stalk;
}

/**
 * A limb bud as a segmented microscope stack would give it: a binary voxel
 * mask of the bud, smoothed by `blur` passes of a 3×3×3 box filter (as
 * segmentation tools do), its 0.5 level set cut out by marching tetrahedra.
 * The result is closed and welded but, like real scans, full of terraces and
 * slivers: the test bed for mesh quality reports and intrinsic Laplacians.
 */
export const scanBud: ShapeDefinition = {
  name: 'scan-bud',
  description: 'an imagined limb bud as a segmented scan gives it: marching tetrahedra on a smoothed voxel mask (terraces, slivers)',
  closed: true,
  scanLike: true,
  parameters: {
    length: { default: 2, min: 0, exclusiveMin: true, description: 'paddle length (along x)' },
    width: { default: 1.4, min: 0, exclusiveMin: true, description: 'paddle width (along y)' },
    thickness: { default: 0.6, min: 0, exclusiveMin: true, description: 'paddle thickness (along z)' },
    stalk: { default: 0.6, min: 0, description: 'stalk length before the paddle' },
    radius: { default: 0.25, min: 0, exclusiveMin: true, description: 'stalk radius' },
    blur: { default: 1, min: 0, max: 4, integer: true, description: 'passes of a 3×3×3 box filter over the voxel mask' },
  },
  check: (p) => (p.radius * 2 > Math.min(p.width, p.thickness) ? 'the stalk (2·radius) must be thinner than the paddle' : null),
  build(p, vertices) {
    const area = Math.PI * (p.length * p.width / 2 + p.width * p.thickness / 2) + 2 * Math.PI * p.radius * p.stalk;
    return buildToVertexCount((h) => voxelBud(p, h), area, vertices);
  },
};

/** The bud's smoothed voxel mask at spacing h, and its 0.5 level set. */
function voxelBud(p: Record<string, number>, h: number) {
  const margin = 3 * h;
  const lo = [-p.radius - margin, -p.width / 2 - margin, -p.thickness / 2 - margin];
  const hi = [p.stalk + p.length + margin, p.width / 2 + margin, p.thickness / 2 + margin];
  const [nx, ny, nz] = [0, 1, 2].map((d) => Math.ceil((hi[d] - lo[d]) / h) + 1);
  let mask: Float64Array = new Float64Array(nx * ny * nz);
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    mask[i + nx * (j + ny * k)] = inBud(lo[0] + i * h, lo[1] + j * h, lo[2] + k * h, p) ? 1 : 0;
  }
  for (let pass = 0; pass < p.blur; pass++) {
    const out = new Float64Array(mask.length);
    for (let k = 1; k + 1 < nz; k++) for (let j = 1; j + 1 < ny; j++) for (let i = 1; i + 1 < nx; i++) {
      let s = 0;
      for (let c = -1; c <= 1; c++) for (let b = -1; b <= 1; b++) for (let a = -1; a <= 1; a++) s += mask[i + a + nx * (j + b + ny * (k + c))];
      out[i + nx * (j + ny * k)] = s / 27;
    }
    mask = out;
  }
  for (let q = 0; q < mask.length; q++) mask[q] -= 0.5;
  return marchingTetrahedra({ values: mask, nx, ny, nz, origin: [lo[0], lo[1], lo[2]], spacing: h });
}
