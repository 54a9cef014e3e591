import { makeMesh, type Mesh } from './Mesh.ts';

/**
 * Close every boundary loop of at most `maxEdges` edges (small holes a scan
 * leaves) with a fan of triangles around a new vertex at the loop's centroid,
 * oriented as the surface around it. Per-vertex data at the new vertex: the
 * mean over the loop. Larger loops (a bud's open base) stay open.
 */
export function fillHoles(mesh: Mesh, maxEdges: number, vertexData: Record<string, Float64Array> = {}): { mesh: Mesh; vertexData: Record<string, Float64Array>; filled: number[]; kept: number[] } {
  const t = mesh.triangles, n = mesh.positions.length / 3;
  // boundary edges, directed as their one triangle has them: a → b
  const count = new Map<number, number>();
  const key = (a: number, b: number) => Math.min(a, b) * n + Math.max(a, b);
  for (let f = 0; f < t.length / 3; f++) for (let k = 0; k < 3; k++) { const e = key(t[3 * f + k], t[3 * f + ((k + 1) % 3)]); count.set(e, (count.get(e) ?? 0) + 1); }
  const nextOf = new Map<number, number>();
  for (let f = 0; f < t.length / 3; f++) for (let k = 0; k < 3; k++) {
    const a = t[3 * f + k], b = t[3 * f + ((k + 1) % 3)];
    if (count.get(key(a, b)) === 1) nextOf.set(a, b);
  }
  const p = Array.from(mesh.positions), tris = Array.from(t);
  const data = Object.fromEntries(Object.entries(vertexData).map(([k, v]) => [k, Array.from(v)]));
  const seen = new Set<number>();
  const filled: number[] = [], kept: number[] = [];
  for (const start of nextOf.keys()) {
    if (seen.has(start)) continue;
    const loop: number[] = [];
    for (let v: number | undefined = start; v !== undefined && !seen.has(v); v = nextOf.get(v)) { seen.add(v); loop.push(v); }
    if (loop.length > maxEdges || loop.length < 3) { kept.push(loop.length); continue; }
    const c = p.length / 3;
    for (let d = 0; d < 3; d++) p.push(loop.reduce((s, v) => s + p[3 * v + d], 0) / loop.length);
    for (const [k, values] of Object.entries(data)) values.push(loop.reduce((s, v) => s + vertexData[k][v], 0) / loop.length);
    // the hole's triangles run against the boundary edges' direction, so orientation agrees across them
    for (let i = 0; i < loop.length; i++) tris.push(loop[(i + 1) % loop.length], loop[i], c);
    filled.push(loop.length);
  }
  return {
    mesh: makeMesh(Float64Array.from(p), Uint32Array.from(tris)),
    vertexData: Object.fromEntries(Object.entries(data).map(([k, v]) => [k, Float64Array.from(v)])),
    filled, kept,
  };
}
