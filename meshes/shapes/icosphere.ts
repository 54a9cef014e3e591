import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';

/**
 * Geodesic sphere: every face of the icosahedron is cut into ν² triangles on a
 * triangular grid (frequency ν, shared edge vertices), then every vertex is pushed
 * onto the sphere. nV = 10ν² + 2, nF = 20ν²; triangle sizes vary by less than a
 * factor of two, with the 12 icosahedron corners the only valence-5 vertices.
 * Triangles are counter-clockwise seen from outside.
 */
export function icosphere(frequency: number, radius = 1): Mesh {
  const nu = Math.max(1, Math.floor(frequency));
  const { corners, faces } = icosahedron();
  // undirected edges of the icosahedron
  const edgeIndex = new Map<number, number>();
  const edgeList: [number, number][] = [];
  for (const [a, b, c] of faces) {
    for (const [u, v] of [[a, b], [b, c], [c, a]] as [number, number][]) {
      const key = Math.min(u, v) * 12 + Math.max(u, v);
      if (!edgeIndex.has(key)) {
        edgeIndex.set(key, edgeList.length);
        edgeList.push([Math.min(u, v), Math.max(u, v)]);
      }
    }
  }
  const nV = 10 * nu * nu + 2;
  const positions = new Float64Array(3 * nV);
  let next = 0;
  const put = (x: number, y: number, z: number): number => {
    const l = radius / Math.hypot(x, y, z);
    positions[3 * next] = x * l;
    positions[3 * next + 1] = y * l;
    positions[3 * next + 2] = z * l;
    return next++;
  };
  for (const c of corners) put(c[0], c[1], c[2]);
  const edgeBase = new Uint32Array(edgeList.length);
  edgeList.forEach(([u, v], e) => {
    edgeBase[e] = next;
    for (let s = 1; s < nu; s++) {
      const f = s / nu;
      put(
        corners[u][0] + f * (corners[v][0] - corners[u][0]),
        corners[u][1] + f * (corners[v][1] - corners[u][1]),
        corners[u][2] + f * (corners[v][2] - corners[u][2]),
      );
    }
  });
  const onEdge = (u: number, v: number, s: number): number => {
    // vertex s steps (of ν) from corner u towards corner v
    if (s === 0) return u;
    if (s === nu) return v;
    const e = edgeIndex.get(Math.min(u, v) * 12 + Math.max(u, v))!;
    return u < v ? edgeBase[e] + s - 1 : edgeBase[e] + nu - s - 1;
  };
  const triangles = new Uint32Array(3 * 20 * nu * nu);
  let t = 0;
  const grid = new Uint32Array((nu + 1) * (nu + 1));
  for (const [A, B, C] of faces) {
    for (let j = 0; j <= nu; j++) {
      for (let i = 0; i + j <= nu; i++) {
        let id: number;
        if (j === 0) id = onEdge(A, B, i);
        else if (i === 0) id = onEdge(A, C, j);
        else if (i + j === nu) id = onEdge(B, C, j);
        else {
          const fi = i / nu, fj = j / nu;
          id = put(
            corners[A][0] + fi * (corners[B][0] - corners[A][0]) + fj * (corners[C][0] - corners[A][0]),
            corners[A][1] + fi * (corners[B][1] - corners[A][1]) + fj * (corners[C][1] - corners[A][1]),
            corners[A][2] + fi * (corners[B][2] - corners[A][2]) + fj * (corners[C][2] - corners[A][2]),
          );
        }
        grid[j * (nu + 1) + i] = id;
      }
    }
    const g = (i: number, j: number) => grid[j * (nu + 1) + i];
    for (let j = 0; j < nu; j++) {
      for (let i = 0; i + j < nu; i++) {
        triangles[t++] = g(i, j); triangles[t++] = g(i + 1, j); triangles[t++] = g(i, j + 1);
        if (i + j + 2 <= nu) {
          triangles[t++] = g(i + 1, j); triangles[t++] = g(i + 1, j + 1); triangles[t++] = g(i, j + 1);
        }
      }
    }
  }
  return makeMesh(positions, triangles);
}

/** Frequency whose icosphere has the vertex count closest to `vertices`. */
export function icosphereFrequencyFor(vertices: number): number {
  return Math.max(1, Math.round(Math.sqrt(Math.max(0, vertices - 2) / 10)));
}

/** The 12 unit-length corners and 20 outward (counter-clockwise) faces of the icosahedron. */
export function icosahedron(): { corners: number[][]; faces: [number, number, number][] } {
  const phi = (1 + Math.sqrt(5)) / 2;
  const raw = [
    [-1, phi, 0], [1, phi, 0], [-1, -phi, 0], [1, -phi, 0],
    [0, -1, phi], [0, 1, phi], [0, -1, -phi], [0, 1, -phi],
    [phi, 0, -1], [phi, 0, 1], [-phi, 0, -1], [-phi, 0, 1],
  ];
  const corners = raw.map((c) => {
    const l = Math.hypot(c[0], c[1], c[2]);
    return [c[0] / l, c[1] / l, c[2] / l];
  });
  // Faces are the triples of mutually adjacent corners (edge length 2 before scaling).
  const adj = (a: number, b: number) =>
    Math.abs(Math.hypot(raw[a][0] - raw[b][0], raw[a][1] - raw[b][1], raw[a][2] - raw[b][2]) - 2) < 1e-9;
  const faces: [number, number, number][] = [];
  for (let a = 0; a < 12; a++)
    for (let b = a + 1; b < 12; b++)
      for (let c = b + 1; c < 12; c++) {
        if (!adj(a, b) || !adj(b, c) || !adj(a, c)) continue;
        const u = corners[a], v = corners[b], w = corners[c];
        const n = [
          (v[1] - u[1]) * (w[2] - u[2]) - (v[2] - u[2]) * (w[1] - u[1]),
          (v[2] - u[2]) * (w[0] - u[0]) - (v[0] - u[0]) * (w[2] - u[2]),
          (v[0] - u[0]) * (w[1] - u[1]) - (v[1] - u[1]) * (w[0] - u[0]),
        ];
        const outward = n[0] * (u[0] + v[0] + w[0]) + n[1] * (u[1] + v[1] + w[1]) + n[2] * (u[2] + v[2] + w[2]) > 0;
        faces.push(outward ? [a, b, c] : [a, c, b]);
      }
  return { corners, faces };
}
