import type { Mesh } from '../../solver/mesh/Mesh.ts';

export interface ShapeParameter {
  default: number;
  /** smallest allowed value (inclusive unless `exclusiveMin`) */
  min?: number;
  max?: number;
  exclusiveMin?: boolean;
  integer?: boolean;
  description: string;
}

/**
 * A parameterised shape generator. `build` gets every parameter (defaults filled
 * in and range-checked by `buildShape`) and a target vertex count.
 */
export interface ShapeDefinition {
  name: string;
  description: string;
  /** closed surface or open (with a natural no-flux boundary) */
  closed: boolean;
  /** its triangles are deliberately poor, as a scan's are (every other shape aims at near-equilateral ones) */
  scanLike?: boolean;
  parameters: Record<string, ShapeParameter>;
  build(params: Record<string, number>, vertices: number): Mesh;
  /** extra consistency checks between parameters; return a message or null */
  check?(params: Record<string, number>): string | null;
}

/** Edge length giving ≈ `vertices` vertices on near-equilateral triangles over `area`. */
export function spacingFor(area: number, vertices: number): number {
  return Math.sqrt((2 * area) / (Math.sqrt(3) * Math.max(4, vertices)));
}

/**
 * Build twice: once at a guessed spacing, then at the spacing rescaled by the
 * vertex count it gave, for shapes whose area is not known in closed form.
 */
export function buildToVertexCount(build: (h: number) => Mesh, areaGuess: number, vertices: number): Mesh {
  const h0 = spacingFor(areaGuess, Math.min(vertices, 4000));
  const first = build(h0);
  const n0 = first.positions.length / 3;
  const h1 = h0 * Math.sqrt(n0 / Math.max(4, vertices));
  return build(h1);
}
