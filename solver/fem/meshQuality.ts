import type { Mesh } from '../mesh/Mesh.ts';
import { cotanStiffness } from './cotanStiffness.ts';
import { lumpedMass } from './lumpedMass.ts';
import { EXPLICIT_STEP_RATIO_WARNING, SLIVER_ANGLE_DEGREES } from '../defaults.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { areaFromSides } from '../mesh/triangleAreas.ts';

export interface MeshQuality {
  /** interior angles of every triangle, degrees: the smallest, the 1st percentile, the largest */
  angles: { min: number; p1: number; max: number };
  /** the smallest angle of each triangle, averaged (60° for equilateral triangles) */
  meanMinimumAngle: number;
  /** radius ratio 2r/R per triangle (1 equilateral, 0 degenerate): smallest, 1st percentile, mean */
  radiusRatio: { min: number; p1: number; mean: number };
  /** share of triangles with an angle over 90° (their cotangent weights can turn negative) */
  obtuseShare: number;
  /** triangles with an angle under SLIVER_ANGLE_DEGREES */
  slivers: number;
  /** the worst triangles by smallest angle: index, vertices, smallest angle in degrees */
  worst: { triangle: number; vertices: [number, number, number]; angle: number }[];
  /**
   * this mesh's explicit (positivity) step limit over that of a mesh of equilateral triangles with
   * the same vertex count and area: 1 for an ideal mesh, far below 1 where a few bad triangles set it
   */
  explicitStepRatio: number;
}

/**
 * The shape quality of a triangle mesh as the finite elements see it: angle
 * and radius-ratio distributions, obtuse triangles, slivers (the worst named),
 * and what they cost the explicit scheme. The positivity bound of forward
 * Euler is 1/max_i(K_ii/m_i); on equilateral triangles of edge h (valence 6)
 * K_ii = 2√3 and m_i = (√3/2)h², so K_ii/m_i = 4/h², and with h² = 2A/(√3·n)
 * (n vertices sharing the area A) the ideal bound is A/(2√3·n).
 */
export function meshQuality(mesh: Mesh, worstCount = 5, operators?: { stiffness: CsrMatrix; mass: Float64Array }): MeshQuality {
  const p = mesh.positions, t = mesh.triangles;
  const nt = t.length / 3, nv = p.length / 3;
  const angles = new Float64Array(3 * nt);
  const minAngles = new Float64Array(nt);
  const ratios = new Float64Array(nt);
  let obtuse = 0, slivers = 0, sumMin = 0, sumRatio = 0, area = 0;
  for (let f = 0; f < nt; f++) {
    const a = t[3 * f], b = t[3 * f + 1], c = t[3 * f + 2];
    const la = Math.hypot(p[3 * b] - p[3 * c], p[3 * b + 1] - p[3 * c + 1], p[3 * b + 2] - p[3 * c + 2]);
    const lb = Math.hypot(p[3 * a] - p[3 * c], p[3 * a + 1] - p[3 * c + 1], p[3 * a + 2] - p[3 * c + 2]);
    const lc = Math.hypot(p[3 * a] - p[3 * b], p[3 * a + 1] - p[3 * b + 1], p[3 * a + 2] - p[3 * b + 2]);
    // angles from the side lengths (law of cosines, clamped), area from them too
    const angle = (x: number, y: number, z: number) => (180 / Math.PI) * Math.acos(Math.max(-1, Math.min(1, (y * y + z * z - x * x) / (2 * y * z || 1))));
    const A = angle(la, lb, lc), B = angle(lb, la, lc), C = 180 - A - B;
    angles[3 * f] = A; angles[3 * f + 1] = B; angles[3 * f + 2] = C;
    const lo = Math.min(A, B, C), hi = Math.max(A, B, C);
    minAngles[f] = lo;
    sumMin += lo;
    if (hi > 90) obtuse++;
    if (lo < SLIVER_ANGLE_DEGREES) slivers++;
    const s = areaFromSides(la, lb, lc);
    area += s;
    const semi = (la + lb + lc) / 2;
    const r = semi > 0 ? s / semi : 0, R = s > 0 ? (la * lb * lc) / (4 * s) : Infinity;
    ratios[f] = Number.isFinite(R) && R > 0 ? (2 * r) / R : 0;
    sumRatio += ratios[f];
  }
  const percentile1 = (v: Float64Array) => {
    if (!v.length) return NaN;
    const s = Float64Array.from(v).sort();
    return s[Math.min(s.length - 1, Math.floor(0.01 * s.length))];
  };
  const order = Array.from({ length: nt }, (_, f) => f).sort((x, y) => minAngles[x] - minAngles[y]).slice(0, worstCount);
  // the explicit scheme's positivity bound against the ideal mesh's A/(2√3·n)
  const K = operators?.stiffness ?? cotanStiffness(mesh), m = operators?.mass ?? lumpedMass(mesh);
  let rate = 0;
  for (let i = 0; i < nv; i++) {
    for (let q = K.rowOffsets[i]; q < K.rowOffsets[i + 1]; q++) if (K.columns[q] === i && m[i] > 0) rate = Math.max(rate, K.values[q] / m[i]);
  }
  const ideal = (2 * Math.sqrt(3) * nv) / area;
  let maxAngle = 0, minAngle = Infinity;
  for (const x of angles) { maxAngle = Math.max(maxAngle, x); minAngle = Math.min(minAngle, x); }
  return {
    angles: { min: minAngle, p1: percentile1(angles), max: maxAngle },
    meanMinimumAngle: nt ? sumMin / nt : NaN,
    radiusRatio: { min: nt ? ratios.reduce((x, y) => Math.min(x, y), Infinity) : NaN, p1: percentile1(ratios), mean: nt ? sumRatio / nt : NaN },
    obtuseShare: nt ? obtuse / nt : 0,
    slivers,
    worst: order.map((f) => ({ triangle: f, vertices: [t[3 * f], t[3 * f + 1], t[3 * f + 2]] as [number, number, number], angle: minAngles[f] })),
    explicitStepRatio: rate > 0 ? ideal / rate : 1,
  };
}

/** What a mesh's quality means for a run, as warnings that say what to do (empty for a good mesh). */
export function qualityWarnings(q: MeshQuality): string[] {
  const out: string[] = [];
  const worst = q.worst.slice(0, 3).map((w) => `triangle ${w.triangle} (vertices ${w.vertices.join(', ')}, ${w.angle.toPrecision(2)}°)`).join(', ');
  if (q.slivers > 0) {
    out.push(`${q.slivers} sliver triangle${q.slivers > 1 ? 's' : ''} (an angle under ${SLIVER_ANGLE_DEGREES}°; the worst: ${worst}): slivers shrink the explicit step and make eigenvalues less accurate; use scheme: imex, or clean the mesh where it was made`);
  }
  if (q.explicitStepRatio < EXPLICIT_STEP_RATIO_WARNING) {
    out.push(`the explicit scheme's step limit on this mesh is ${formatRatio(q.explicitStepRatio)} of a well-shaped mesh's with as many vertices: a few bad triangles (${worst}) set it; use scheme: imex`);
  }
  return out;
}

const formatRatio = (x: number) => (x >= 0.01 ? `${(100 * x).toPrecision(2)} %` : `1/${Math.round(1 / x).toLocaleString('en-US')}`);
