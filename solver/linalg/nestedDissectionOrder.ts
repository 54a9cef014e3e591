/**
 * Fill-reducing elimination order for a symmetric sparsity pattern (CSR; the
 * diagonal may or may not be present) by nested dissection with breadth-first
 * level-set separators: from a pseudo-peripheral vertex, the level near the
 * middle with the fewest vertices separates the graph; the two halves are
 * ordered recursively, the separator last. On surface meshes the separators are
 * O(√n) rings, which gives the O(n log n) fill of planar nested dissection.
 *
 * Returns `order`: Uint32Array(n), order[k] = the vertex eliminated k-th.
 */
export function nestedDissectionOrder(
  n: number,
  rowOffsets: Uint32Array,
  columns: Uint32Array,
  leafSize = 48,
): Uint32Array {
  const order = new Uint32Array(n);
  const stamp = new Int32Array(n).fill(-1); // which subset a vertex currently belongs to
  const level = new Int32Array(n);
  const queue = new Uint32Array(n);
  // Work list of subsets: vertices in `work[lo..hi)`, ordered into `order[lo..hi)`.
  const work = new Uint32Array(n);
  for (let i = 0; i < n; i++) work[i] = i;
  const tmp = new Uint32Array(n);
  const stack: number[] = [0, n]; // pairs lo, hi
  let nextStamp = 0;

  const bfs = (root: number, s: number): number => {
    // returns the number of visited vertices; fills queue[0..count) and level[]
    let head = 0, tail = 0;
    queue[tail++] = root;
    level[root] = 0;
    const seen = nextStamp++;
    // mark visited by moving the stamp to `-2 - seen` temporarily
    stamp[root] = -2 - seen;
    while (head < tail) {
      const v = queue[head++];
      for (let p = rowOffsets[v]; p < rowOffsets[v + 1]; p++) {
        const u = columns[p];
        if (stamp[u] === s) {
          stamp[u] = -2 - seen;
          level[u] = level[v] + 1;
          queue[tail++] = u;
        }
      }
    }
    for (let i = 0; i < tail; i++) stamp[queue[i]] = s;
    return tail;
  };

  while (stack.length > 0) {
    const hi = stack.pop()!;
    const lo = stack.pop()!;
    const size = hi - lo;
    if (size <= 0) continue;
    const s = nextStamp++;
    for (let i = lo; i < hi; i++) stamp[work[i]] = s;
    if (size <= leafSize) {
      // small set: order by breadth-first search from its first vertex (per component)
      let k = lo;
      for (let i = lo; i < hi; i++) {
        const v = work[i];
        if (stamp[v] !== s) continue;
        const cnt = bfs(v, s);
        for (let j = 0; j < cnt; j++) {
          order[k++] = queue[j];
          stamp[queue[j]] = -1;
        }
      }
      continue;
    }
    // Connected component of the first vertex; if it is not everything, split off.
    const cnt0 = bfs(work[lo], s);
    if (cnt0 < size) {
      // component first, the rest after: both independent subsets
      for (let i = 0; i < cnt0; i++) stamp[queue[i]] = -3;
      let a = lo, b = lo + cnt0;
      for (let i = lo; i < hi; i++) {
        const v = work[i];
        if (stamp[v] === -3) tmp[a++] = v;
        else tmp[b++] = v;
      }
      for (let i = lo; i < hi; i++) { work[i] = tmp[i]; stamp[work[i]] = -1; }
      stack.push(lo, lo + cnt0, lo + cnt0, hi);
      continue;
    }
    // Pseudo-peripheral root: repeat BFS from the last-reached vertex.
    let root = queue[cnt0 - 1];
    let depth = level[root];
    for (let it = 0; it < 4; it++) {
      bfs(root, s);
      const far = queue[size - 1];
      if (level[far] <= depth && it > 0) break;
      depth = level[far];
      root = far;
    }
    bfs(root, s);
    depth = level[queue[size - 1]];
    if (depth < 2) {
      let k = lo;
      for (let i = 0; i < size; i++) { order[k++] = queue[i]; stamp[queue[i]] = -1; }
      continue;
    }
    // level sizes
    const counts = new Uint32Array(depth + 1);
    for (let i = 0; i < size; i++) counts[level[queue[i]]]++;
    let best = -1, bestScore = Infinity, before = 0;
    for (let l = 0; l <= depth; l++) {
      const frac = before / size;
      const after = size - before - counts[l];
      if (l > 0 && l < depth && frac > 0.2 && after / size > 0.2) {
        const score = counts[l] * (1 + 2 * Math.abs(frac + counts[l] / (2 * size) - 0.5));
        if (score < bestScore) { bestScore = score; best = l; }
      }
      before += counts[l];
    }
    if (best < 0) {
      before = 0;
      for (let l = 0; l <= depth; l++) {
        if (before + counts[l] >= size / 2) { best = Math.max(1, Math.min(depth - 1, l)); break; }
        before += counts[l];
      }
    }
    // A: levels < best; B: levels > best; separator: level best, thinned by moving
    // separator vertices with no neighbour in B into A.
    let na = 0, nb = 0;
    for (let i = 0; i < size; i++) {
      const v = queue[i];
      const l = level[v];
      if (l === best) {
        let touchesB = false;
        for (let p = rowOffsets[v]; p < rowOffsets[v + 1]; p++) {
          const u = columns[p];
          if (stamp[u] === s && level[u] === best + 1) { touchesB = true; break; }
        }
        if (!touchesB) level[v] = best - 1;
      }
    }
    for (let i = 0; i < size; i++) {
      const l = level[queue[i]];
      if (l < best) na++;
      else if (l > best) nb++;
    }
    let a = lo, b = lo + na, c = lo + na + nb;
    for (let i = 0; i < size; i++) {
      const v = queue[i];
      const l = level[v];
      if (l < best) tmp[a++] = v;
      else if (l > best) tmp[b++] = v;
      else tmp[c++] = v;
      stamp[v] = -1;
    }
    for (let i = lo; i < hi; i++) work[i] = tmp[i];
    for (let i = lo + na + nb; i < hi; i++) order[i] = work[i];
    stack.push(lo, lo + na, lo + na, lo + na + nb);
  }
  return order;
}
