import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceProjector } from '../mesh/surfaceProjector.ts';
import { edgeLengthStats } from '../mesh/edgeLengthStats.ts';
import { mapDistortion, type Spread } from './mapDistortion.ts';
import type { SurfaceMap } from './mapOntoSurface.ts';
import type { AffineMap } from './globalAlignment.ts';

/** How one stage was reached: `record.json` → growth.stages, and a line on the terminal. */
export interface StageMapReport {
  /** 1 for the first keyframe */
  stage: number;
  file: string;
  /** the keyframe's time (absent when stages are mapped outside a run) */
  time?: number;
  /** vertices of the stage mesh (the run keeps its own) */
  stageVertices: number;
  /** the global map found first (x ↦ matrix·x + shift) */
  alignment: AffineMap;
  /** each triangle's area on the stage over its area before */
  areaRatio: Spread;
  /** each triangle's largest angle change, degrees */
  angleChange: Spread;
  /** largest distance a vertex moved in the final projection onto the stage */
  maxProjection: number;
  /** largest distance from a vertex of the stage mesh to the mapped surface (what the map leaves uncovered) */
  gap: number;
  /** the stage mesh's mean edge, the scale of the two distances above */
  stageMeanEdge: number;
  landmarks: { name: string; residual: number }[];
  /** vertices moved again to undo folds */
  relaxed: number;
  folded: number;
  collapsed: number;
  /** triangles spanning a gap of the stage */
  bridging: number;
  seconds: number;
}

/** The report of a map from `before` (positions on the source's triangles) onto `stage`. */
export function stageMapReport(triangles: Uint32Array, before: Float64Array, map: SurfaceMap, stage: Mesh, info: { stage: number; file: string; time?: number; landmarkNames: string[]; seconds: number }): StageMapReport {
  const distortion = mapDistortion(triangles, before, map.positions);
  const onMapped = new SurfaceProjector({ positions: map.positions, triangles });
  const y = Float64Array.from(stage.positions);
  let gap = 0;
  for (let j = 0; j < y.length / 3; j++) {
    onMapped.project(y, j);
    gap = Math.max(gap, onMapped.distance);
  }
  return {
    stage: info.stage,
    file: info.file,
    ...(info.time === undefined ? {} : { time: info.time }),
    stageVertices: stage.positions.length / 3,
    alignment: map.transform,
    areaRatio: distortion.areaRatio,
    angleChange: distortion.angleChange,
    maxProjection: map.maxDistance,
    gap,
    stageMeanEdge: edgeLengthStats(stage).mean,
    landmarks: info.landmarkNames.map((name, k) => ({ name, residual: map.landmarkResiduals[k] })),
    relaxed: map.relaxed,
    folded: map.folded.length,
    collapsed: map.collapsed.length,
    bridging: map.bridging.length,
    seconds: info.seconds,
  };
}

/** The report in a few lines, lengths with the mesh's unit. */
export function formatStageMap(r: StageMapReport, unit = ''): string {
  const u = unit ? ` ${unit}` : '';
  const f = (v: number) => v.toPrecision(3);
  const lines = [
    `stage ${r.stage} (${r.file}${r.time === undefined ? '' : `, t = ${r.time}`}, ${r.stageVertices} vertices): mapped in ${r.seconds.toFixed(1)} s, ${r.folded} folded, ${r.collapsed} collapsed, ${r.bridging} across gaps${r.relaxed ? `, ${r.relaxed} vertices relaxed to undo folds` : ''}`,
    `  area ratio ${f(r.areaRatio.p5)} … ${f(r.areaRatio.p50)} … ${f(r.areaRatio.p95)} (5th, 50th, 95th percentile; extremes ${f(r.areaRatio.min)}, ${f(r.areaRatio.max)}); angle change ${r.angleChange.p50.toFixed(1)}° median, ${r.angleChange.p95.toFixed(1)}° at the 95th percentile`,
    `  final projection ≤ ${f(r.maxProjection)}${u} (${f(r.maxProjection / r.stageMeanEdge)} mean edges); stage left uncovered by ≤ ${f(r.gap)}${u} (${f(r.gap / r.stageMeanEdge)} mean edges)`,
  ];
  if (r.landmarks.length) lines.push(`  landmarks off their points by: ${r.landmarks.map((l) => `${l.name} ${f(l.residual)}${u}`).join(', ')}`);
  return lines.join('\n');
}
