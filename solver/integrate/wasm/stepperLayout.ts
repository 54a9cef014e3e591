/**
 * Where a stepper's arrays live in its WebAssembly memory: every per-vertex
 * array the kernels read or write, at 16-byte aligned byte offsets, so one
 * memory (shared between threads when there are several) holds a whole run.
 * Sizes are in elements; offsets in bytes.
 */

/** Rows per block of the reductions: dot products are summed block by block, then the blocks in order, whatever the threads. */
export const REDUCTION_BLOCK = 1024;

export interface StepperShape {
  /** vertices (rows) and species */
  n: number;
  nS: number;
  /** ELL width and the number of overflow entries (rows longer than the width) */
  width: number;
  overflowCount: number;
  /** weight sets: K (and per-species D-weighted K) */
  sets: number;
  /** per-vertex parameter fields, by parameter index */
  fieldParameters: readonly boolean[];
  /** whether the rates use x, y, z */
  usesPositions: boolean;
  /** conjugate-gradient work arrays */
  cg: boolean;
  /** a moving surface: the corner table the geometry kernel reassembles K and M from (see geometryCorners) */
  growing?: { corners: number; triangles: number };
}

/** Int32 entries per corner of the corner table: j, k (byte offsets of their positions), slots of ij and ik, triangle (byte offset of its coefficient). */
export const CORNER_STRIDE = 5;

export interface StepperLayout {
  shape: StepperShape;
  /** reduction blocks (ceil(n / REDUCTION_BLOCK)) and partial sums per block */
  blocks: number;
  slots: number;
  columns: number;
  overflowOffsets: number;
  overflowColumns: number;
  diagonal: number[];
  weights: number[];
  overflow: number[];
  mass: number;
  states: [number, number];
  fields: (number | undefined)[];
  positions: number;
  /** the corner table of a moving surface (−1 otherwise): row i's corners are cornerOffsets[i] … cornerOffsets[i+1] − 1 */
  cornerOffsets: number;
  corners: number;
  /** a moving surface's next positions (checked, then taken by the geometry kernel), or −1 */
  moved: number;
  /** per weight set: its per-triangle coefficient (D-weighted sets of a moving surface), or −1 */
  triangleCoefficients: number[];
  inverseDiagonal: number;
  r: number;
  p: number;
  q: number;
  partials: number;
  scalars: number;
  /** bytes in all */
  bytes: number;
}

/** Lay a stepper's arrays out one after another. */
export function stepperLayout(shape: StepperShape): StepperLayout {
  const { n, nS, width, overflowCount, sets } = shape;
  let at = 0;
  const take = (bytes: number) => {
    const start = at;
    at += Math.ceil(bytes / 16) * 16;
    return start;
  };
  const blocks = Math.max(1, Math.ceil(n / REDUCTION_BLOCK));
  const slots = Math.max(4 * nS, 1 + nS);
  const layout: StepperLayout = {
    shape,
    blocks,
    slots,
    columns: take(4 * n * width),
    overflowOffsets: take(4 * (n + 1)),
    overflowColumns: take(4 * Math.max(1, overflowCount)),
    diagonal: [], weights: [], overflow: [],
    mass: take(8 * n),
    states: [take(8 * n * nS), take(8 * n * nS)],
    fields: shape.fieldParameters.map((f) => (f ? take(8 * n) : undefined)),
    positions: shape.usesPositions || shape.growing ? take(24 * n) : -1,
    cornerOffsets: shape.growing ? take(4 * (n + 1)) : -1,
    corners: shape.growing ? take(4 * CORNER_STRIDE * shape.growing.corners) : -1,
    moved: shape.growing ? take(24 * n) : -1,
    triangleCoefficients: [],
    inverseDiagonal: shape.cg ? take(8 * n * nS) : -1,
    r: shape.cg ? take(8 * n * nS) : -1,
    p: shape.cg ? take(8 * n * nS) : -1,
    q: shape.cg ? take(8 * n * nS) : -1,
    partials: take(8 * blocks * slots),
    scalars: take(8 * 4 * nS),
    bytes: 0,
  };
  for (let g = 0; g < sets; g++) {
    layout.diagonal.push(take(8 * n));
    // the overflow right after the block, so a slot k (block) or n·width + o (overflow o) addresses either
    layout.weights.push(take(8 * (n * width + Math.max(1, overflowCount))));
    layout.overflow.push(layout.weights[g] + 8 * n * width);
    layout.triangleCoefficients.push(shape.growing && g > 0 ? take(8 * shape.growing.triangles) : -1);
  }
  layout.bytes = at;
  return layout;
}
