/** Per-triangle mean of a per-vertex field (the P1 coefficient of a triangle). */
export function triangleMeans(triangles: Uint32Array, field: Float64Array): Float64Array {
  const nF = triangles.length / 3;
  const out = new Float64Array(nF);
  for (let t = 0; t < nF; t++) out[t] = (field[triangles[3 * t]] + field[triangles[3 * t + 1]] + field[triangles[3 * t + 2]]) / 3;
  return out;
}
