import type { Mesh } from '../mesh/Mesh.ts';
import { meshTopology } from '../mesh/meshTopology.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';

/** Vertex adjacency (as `meshTopology` gives it), kept by long runs that release the rest. */
export interface VertexNeighbours {
  readonly vertexNeighbourOffsets: Uint32Array;
  readonly vertexNeighbours: Uint32Array;
}

export interface PatchSummary {
  /** vertices in the patch */
  size: number;
  /** surface area (sum of lumped masses of its vertices) */
  area: number;
  /** area-weighted mean position */
  centroid: [number, number, number];
}

export interface ThresholdComponents {
  threshold: number;
  /** patch index per vertex, −1 where the field is at or below the threshold */
  label: Int32Array;
  patches: PatchSummary[];
}

/**
 * The patches (spots, stripes) of a field: connected components, along mesh
 * edges, of the vertices where the field exceeds `threshold`. Default threshold:
 * the mid-range (min + max)/2.
 */
export function thresholdComponents(
  mesh: Mesh,
  field: ArrayLike<number>,
  threshold?: number,
  mass: Float64Array = lumpedMass(mesh),
  neighbours: VertexNeighbours = meshTopology(mesh),
): ThresholdComponents {
  const n = mesh.positions.length / 3;
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < n; i++) { if (field[i] < lo) lo = field[i]; if (field[i] > hi) hi = field[i]; }
  const th = threshold ?? 0.5 * (lo + hi);
  const offsets = neighbours.vertexNeighbourOffsets, nb = neighbours.vertexNeighbours;
  const label = new Int32Array(n).fill(-1);
  const patches: PatchSummary[] = [];
  const stack = new Int32Array(n);
  const p = mesh.positions;
  for (let seed = 0; seed < n; seed++) {
    if (label[seed] !== -1 || !(field[seed] > th)) continue;
    const id = patches.length;
    let top = 0, size = 0, area = 0, cx = 0, cy = 0, cz = 0;
    stack[top++] = seed;
    label[seed] = id;
    while (top > 0) {
      const i = stack[--top];
      size++;
      const m = mass[i];
      area += m;
      cx += m * p[3 * i]; cy += m * p[3 * i + 1]; cz += m * p[3 * i + 2];
      for (let k = offsets[i]; k < offsets[i + 1]; k++) {
        const j = nb[k];
        if (label[j] === -1 && field[j] > th) { label[j] = id; stack[top++] = j; }
      }
    }
    patches.push({ size, area, centroid: [cx / area, cy / area, cz / area] });
  }
  return { threshold: th, label, patches };
}
