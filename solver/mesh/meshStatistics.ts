import type { Mesh } from './Mesh.ts';
import { meshTopology } from './meshTopology.ts';
import { meshArea } from './triangleAreas.ts';
import { edgeLengthStats, type EdgeLengthStats } from './edgeLengthStats.ts';
import { validateMesh } from './validateMesh.ts';

export interface MeshStatistics {
  vertices: number;
  triangles: number;
  area: number;
  /** total genus over the components; null (NaN) when a component is not an orientable manifold */
  genus: number;
  /** the genus of each component, when there are several */
  componentGenus?: number[];
  boundaryLoops: number;
  components: number;
  eulerCharacteristic: number;
  edgeLength: EdgeLengthStats;
  warnings: string[];
  errors: string[];
}

/** Counts, topology and validation messages of a mesh (what `placode mesh --json` prints). */
export function meshStatistics(mesh: Mesh): MeshStatistics {
  const report = validateMesh(mesh);
  const broken = report.errors.some((e) => e.code === 'index-out-of-range' || e.code === 'no-triangles');
  const topo = broken ? null : meshTopology(mesh);
  return {
    vertices: mesh.positions.length / 3,
    triangles: mesh.triangles.length / 3,
    area: broken ? NaN : meshArea(mesh),
    genus: topo ? topo.genus : NaN,
    componentGenus: topo && topo.componentCount > 1 ? [...topo.componentGenus] : undefined,
    boundaryLoops: topo ? topo.boundaryLoops.length : 0,
    components: topo ? topo.componentCount : 0,
    eulerCharacteristic: topo ? topo.eulerCharacteristic : NaN,
    edgeLength: broken ? { min: NaN, mean: NaN, max: NaN } : edgeLengthStats(mesh),
    warnings: report.warnings.map((w) => w.message),
    errors: report.errors.map((e) => e.message),
  };
}
