import { MIN_EDGES_PER_WAVELENGTH } from '../defaults.ts';

/**
 * The fastest-growing wavelength 2π/√k² against the mesh's mean edge: a
 * warning when fewer than MIN_EDGES_PER_WAVELENGTH edges span it (the P1
 * eigenvalues of the modes that set the pattern are then several per cent
 * low, an error that falls as h², Dziuk 1988), else undefined.
 */
export function resolutionWarning(meanEdge: number, fastestK2: number, unit = ''): string | undefined {
  if (!(fastestK2 > 0) || !(meanEdge > 0)) return undefined;
  const wavelength = (2 * Math.PI) / Math.sqrt(fastestK2);
  const per = wavelength / meanEdge;
  if (per >= MIN_EDGES_PER_WAVELENGTH) return undefined;
  const u = unit ? ` ${unit}` : '';
  // the refinement study's fit, trusted while it stays modest (from 4 edges per wavelength up)
  const error = 2.4 * (10 / per) ** 2;
  const cost = per >= 4 ? `come out about ${Math.round(error)} % low in eigenvalue` : 'are not resolved (the pattern would be an artefact of the mesh)';
  return `the fastest-growing wavelength 2π/√k² = ${wavelength.toPrecision(3)}${u} spans only ${per.toFixed(1)} mean edges (${meanEdge.toPrecision(3)}${u}); under ${MIN_EDGES_PER_WAVELENGTH} the surface modes that set the pattern ${cost}: refine the mesh (mesh.refine, or more vertices) to edges at least ${(Math.ceil((MIN_EDGES_PER_WAVELENGTH / per) * 10) / 10).toFixed(1)}× shorter`;
}

/**
 * A pattern wavelength far larger than the whole surface (√area) or far finer than anything a mesh
 * of it could hold usually means the mesh and the parameters are in different length units (a
 * limb bud in µm with diffusion in mm²): a warning that says how to convert, else undefined.
 */
export function unitsMismatch(area: number, fastestK2: number, unit?: string): string | undefined {
  if (!(fastestK2 > 0) || !(area > 0)) return undefined;
  const wavelength = (2 * Math.PI) / Math.sqrt(fastestK2), size = Math.sqrt(area);
  const u = unit ? ` ${unit}` : '';
  if (wavelength > 20 * size) return `the fastest-growing wavelength 2π/√k² = ${wavelength.toPrecision(3)}${u} is ${Math.round(wavelength / size)}× the surface's size (√area = ${size.toPrecision(3)}${u}): no pattern can form on it. Are the mesh and the parameters in the same length unit? mesh.scale converts the coordinates (0.001 turns µm into mm) and mesh.units names the unit`;
  if (wavelength < size / 2000) return `the fastest-growing wavelength 2π/√k² = ${wavelength.toPrecision(3)}${u} is ${Math.round(size / wavelength)}× smaller than the surface's size (√area = ${size.toPrecision(3)}${u}): no mesh could resolve it. Are the mesh and the parameters in the same length unit? mesh.scale converts the coordinates (1000 turns mm into µm) and mesh.units names the unit`;
  return undefined;
}
