import type { CompiledKinetics } from '../../kinetics/compileKinetics.ts';
import { parameterPlaceholder, speciesPlaceholder } from '../../kinetics/compileKinetics.ts';
import { F64, FunctionBuilder, I32, Op, Simd, V128, WasmModule } from './WasmModule.ts';
import { emitFormula, MATH_IMPORTS, type MathImport } from './formulaToWasm.ts';
import { CORNER_STRIDE, REDUCTION_BLOCK, type StepperLayout } from './stepperLayout.ts';

/**
 * The kernels of one stepper, generated as a WebAssembly module over its
 * memory layout (see stepperLayout). Every kernel works on a range of
 * reduction blocks [b0, b1), so threads split the rows at block boundaries
 * and dot products are summed per block in row order (the caller sums the
 * blocks in order): results are bit for bit the same for any number of
 * threads. Pointers, the time step, the diffusion coefficients and constant
 * parameters are baked in; the state arrays (which swap every step) and the
 * time are arguments.
 *
 * The arithmetic is JavaScript's, operation for operation (IEEE double, no
 * fused multiply-add; formulas as `formulaToCode` orders them), and the sums
 * over a row's neighbours take two species at once in f64x2 lanes when they
 * share a stiffness: each lane does exactly the scalar operations.
 *
 * Kernels (exports):
 *   explicit(b0, b1, U, O, t) → 1 if any new value is not finite
 *       O = U + dt·f(U) − c·M⁻¹K U   (the weights hold M⁻¹K, c = dt·D or dt for a D-weighted K)
 *   rhs(b0, b1, U, X, t) → 1 if any value is not finite      X = U + dt·f(U)
 *   cgStart(b0, b1, X), cgProduct(b0, b1), cgUpdate(b0, b1, X), cgDirection(b0, b1),
 *   cgTotal(b0, b1, X), cgShift(b0, b1, X): the sweeps of the fused Jacobi-CG solve of
 *       (diag(m) + c·K)·x = m·g for every species, x (= X) starting at g
 *   checkMove(b0, b1, r²) → 1 if a triangle of the moved surface (positions at
 *       `moved`) turns over, or its area falls below r times its area now, or is
 *       not finite: each triangle looked at once, in the row of its first vertex
 *   geometry(b0, b1, U): a moving surface's rows of K (every weight set) and
 *       lumped M from the moved positions (which become the positions), gathered over each row's corners; U scaled
 *       by m(old)/m(new); the weights scaled by 1/m (explicit) or the Jacobi
 *       diagonal refreshed (CG); per block, the largest |m(new)/m(old) − 1|
 * Scalars the sweeps need (α, β, shift per species) are read from `scalars`;
 * their sums go to `partials[block·slots + slot]`.
 */
export interface StepperKernelPlan {
  layout: StepperLayout;
  kinetics: CompiledKinetics;
  /** per species: its weight set, or −1 if it does not diffuse */
  weightSet: readonly number[];
  /** per species: c_s (dt·D_s for the shared K, dt for a D-weighted K) */
  coefficient: readonly number[];
  dt: number;
  /** constant parameter values (field parameters: 0, read per vertex) */
  constants: readonly number[];
  /** the weights hold M⁻¹K (explicit scheme) rather than K */
  rowScaled: boolean;
  /** a memory shared between threads */
  shared: boolean;
  pages: number;
}

export interface StepperExports {
  explicit(b0: number, b1: number, U: number, O: number, t: number): number;
  rhs(b0: number, b1: number, U: number, X: number, t: number): number;
  cgStart(b0: number, b1: number, X: number): void;
  cgProduct(b0: number, b1: number): void;
  cgUpdate(b0: number, b1: number, X: number): void;
  cgDirection(b0: number, b1: number): void;
  cgTotal(b0: number, b1: number, X: number): void;
  cgShift(b0: number, b1: number, X: number): void;
  geometry(b0: number, b1: number, U: number): void;
  checkMove(b0: number, b1: number, ratioSquared: number): number;
}

/** Partial-sum slots of each CG sweep: start rz rr bb sb, product pq, update rz rr, total area mx. */
export const CG_SLOTS = { start: 4, product: 1, update: 2 } as const;
/** Scalars the CG sweeps read: α at [s], β at [nS + s], the conservation shift at [2nS + s]. */
export const CG_SCALARS = { alpha: 0, beta: 1, shift: 2 } as const;

interface Row {
  /** row index, 8·i, the row's column and weight offsets, and its state offset i·nS·8 */
  i: number; i8: number; rw: number; rwf: number; b: number;
}

class KernelWriter {
  readonly f: FunctionBuilder;
  private readonly L: StepperLayout;
  private readonly nS: number;
  private readonly W: number;
  constructor(readonly plan: StepperKernelPlan, params: (typeof I32 | typeof F64)[], results: (typeof I32)[]) {
    this.f = new FunctionBuilder(params, results);
    this.L = plan.layout;
    this.nS = plan.layout.shape.nS;
    this.W = plan.layout.shape.width;
  }

  /**
   * Loop over the rows of blocks [b0, b1) (params 0 and 1); `blockStart` and
   * `blockEnd` run around each block's rows (reset and store partial sums).
   */
  rows(body: (row: Row) => void, blockStart: () => void = () => {}, blockEnd: (block: number) => void = () => {}): void {
    const f = this.f, n = this.L.shape.n, W = this.W, nS = this.nS;
    const blk = f.local(I32), i = f.local(I32), end = f.local(I32), i8 = f.local(I32), rw = f.local(I32), rwf = f.local(I32), b = f.local(I32);
    f.get(0).set(blk);
    f.block().loop();
    f.get(blk).get(1).op(Op.i32GeS).brIf(1);
    blockStart();
    // rows blk·B … min(n, (blk+1)·B)
    f.get(blk).i32(REDUCTION_BLOCK).op(Op.i32Mul).set(i);
    f.get(i).i32(REDUCTION_BLOCK).op(Op.i32Add).i32(n).get(i).i32(REDUCTION_BLOCK).op(Op.i32Add).i32(n).op(Op.i32LtS).op(Op.select).set(end);
    f.get(i).i32(8).op(Op.i32Mul).set(i8);
    f.get(i).i32(4 * W).op(Op.i32Mul).set(rw);
    f.get(i).i32(8 * W).op(Op.i32Mul).set(rwf);
    f.get(i).i32(8 * nS).op(Op.i32Mul).set(b);
    f.block().loop();
    f.get(i).get(end).op(Op.i32GeS).brIf(1);
    body({ i, i8, rw, rwf, b });
    f.get(i).i32(1).op(Op.i32Add).set(i);
    f.get(i8).i32(8).op(Op.i32Add).set(i8);
    f.get(rw).i32(4 * W).op(Op.i32Add).set(rw);
    f.get(rwf).i32(8 * W).op(Op.i32Add).set(rwf);
    f.get(b).i32(8 * nS).op(Op.i32Add).set(b);
    f.br(0).end().end();
    blockEnd(blk);
    f.get(blk).i32(1).op(Op.i32Add).set(blk);
    f.br(0).end().end();
  }

  /** Load the f64 at `local + offset` (offset a baked byte address). */
  load(local: number, offset: number): void {
    this.f.get(local).loadF64(offset);
  }

  /**
   * a_s = (K_s v)_i for every diffusing species: diag·own + Σ_k w_k·v[j_k + s]
   * (+ the row's overflow entries), in that order; species sharing a weight
   * set in pairs of f64x2 lanes. `vector` is a local holding v's byte offset,
   * `own[s]` a local holding v[b + s]. Returns the f64 local of each a_s (or −1).
   */
  rowProducts(row: Row, vector: number, own: readonly number[]): number[] {
    const f = this.f, L = this.L, W = this.W, plan = this.plan, nS = this.nS;
    const sets = [...new Set(plan.weightSet.filter((g) => g >= 0))];
    const result = plan.weightSet.map(() => -1);
    if (!sets.length) return result;
    // the row's neighbours (byte offsets of their state) and weights, loaded once
    const cols: number[] = [];
    for (let k = 0; k < W; k++) {
      const j = f.local(I32);
      f.get(row.rw).loadI32(L.columns + 4 * k).get(vector).op(Op.i32Add).set(j);
      cols.push(j);
    }
    const weights = new Map<number, number[]>();
    for (const g of sets) {
      const ws: number[] = [];
      for (let k = 0; k < W; k++) {
        const w = f.local(F64);
        f.get(row.rwf).loadF64(L.weights[g] + 8 * k).set(w);
        ws.push(w);
      }
      weights.set(g, ws);
    }
    // groups: pairs (s, s+1) on one set, else single species
    const groups: number[][] = [];
    for (let s = 0; s < nS; s++) {
      const g = plan.weightSet[s];
      if (g < 0) continue;
      if (s + 1 < nS && plan.weightSet[s + 1] === g) {
        groups.push([s, s + 1]);
        s++;
      } else groups.push([s]);
    }
    const accumulators = groups.map((grp) => {
      const g = plan.weightSet[grp[0]];
      const ws = weights.get(g)!;
      if (grp.length === 2) {
        const acc = f.local(V128);
        // (d·v_s, d·v_s+1) + Σ (w_k·v[j_k+s], w_k·v[j_k+s+1])
        f.get(row.i8).loadF64(L.diagonal[g]).simd(Simd.f64x2Splat);
        f.get(vector).get(row.b).op(Op.i32Add).loadV128(8 * grp[0]);
        f.simd(Simd.f64x2Mul);
        for (let k = 0; k < W; k++) {
          f.get(ws[k]).simd(Simd.f64x2Splat).get(cols[k]).loadV128(8 * grp[0]).simd(Simd.f64x2Mul).simd(Simd.f64x2Add);
        }
        f.set(acc);
        return { grp, g, acc };
      }
      const s = grp[0];
      const acc = f.local(F64);
      f.get(row.i8).loadF64(L.diagonal[g]).get(own[s]).op(Op.f64Mul);
      for (let k = 0; k < W; k++) f.get(ws[k]).get(cols[k]).loadF64(8 * s).op(Op.f64Mul).op(Op.f64Add);
      f.set(acc);
      return { grp, g, acc };
    });
    if (L.shape.overflowCount > 0) {
      // the row's overflow entries k = first … stop − 1: columns and per-set values, added in order
      const k = f.local(I32), stop = f.local(I32), col = f.local(I32);
      f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.overflowOffsets).set(k);
      f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.overflowOffsets + 4).set(stop);
      f.block().loop();
      f.get(k).get(stop).op(Op.i32GeS).brIf(1);
      f.get(k).i32(4).op(Op.i32Mul).loadI32(L.overflowColumns).get(vector).op(Op.i32Add).set(col);
      for (const a of accumulators) {
        f.get(a.acc);
        if (a.grp.length === 2) {
          f.get(k).i32(8).op(Op.i32Mul).loadF64(L.overflow[a.g]).simd(Simd.f64x2Splat);
          f.get(col).loadV128(8 * a.grp[0]).simd(Simd.f64x2Mul).simd(Simd.f64x2Add);
        } else {
          f.get(k).i32(8).op(Op.i32Mul).loadF64(L.overflow[a.g]).get(col).loadF64(8 * a.grp[0]).op(Op.f64Mul).op(Op.f64Add);
        }
        f.set(a.acc);
      }
      f.get(k).i32(1).op(Op.i32Add).set(k);
      f.br(0).end().end();
    }
    for (const a of accumulators) {
      if (a.grp.length === 1) result[a.grp[0]] = a.acc;
      else {
        for (const [lane, s] of a.grp.entries()) {
          const x = f.local(F64);
          f.get(a.acc).simd(Simd.f64x2ExtractLane, lane).set(x);
          result[s] = x;
        }
      }
    }
    return result;
  }

  /**
   * Locals of the reaction formulas at row i: species from `state` (byte
   * offset local + b), parameters (constants once, fields per row), x y z, t.
   */
  reactionLocals(row: Row, state: number, time: number, constantLocals: Record<string, number>): { names: Record<string, number>; u: number[] } {
    const f = this.f, L = this.L, plan = this.plan, nS = this.nS;
    const names: Record<string, number> = { ...constantLocals };
    const u: number[] = [];
    for (let s = 0; s < nS; s++) {
      const x = f.local(F64);
      f.get(state).get(row.b).op(Op.i32Add).loadF64(8 * s).set(x);
      names[speciesPlaceholder(s)] = x;
      u.push(x);
    }
    L.fields.forEach((at, p) => {
      if (at === undefined) return;
      const q = f.local(F64);
      f.get(row.i8).loadF64(at).set(q);
      names[parameterPlaceholder(p)] = q;
    });
    const uses = plan.kinetics.uses;
    (['x', 'y', 'z'] as const).forEach((c, d) => {
      if (!uses[c]) return;
      const x = f.local(F64);
      f.get(row.i8).i32(3).op(Op.i32Mul).loadF64(L.positions + 8 * d).set(x);
      names[`c${c}`] = x;
    });
    if (uses.t) names.ct = time;
    return { names, u };
  }

  /** Locals holding the constant parameters (set once, before the loop). */
  constantLocals(): Record<string, number> {
    const f = this.f, out: Record<string, number> = {};
    this.plan.constants.forEach((v, p) => {
      if (this.L.fields[p] !== undefined) return;
      const q = f.local(F64);
      f.f64(v).set(q);
      out[parameterPlaceholder(p)] = q;
    });
    return out;
  }

  /** flag |= (value − value ≠ 0): set when the value is infinite or NaN */
  flagNonFinite(flag: number, value: number): void {
    this.f.get(flag).get(value).get(value).op(Op.f64Sub).f64(0).op(Op.f64Ne).op(Op.i32Or).set(flag);
  }

  /** Sums kept per block: locals reset at each block's start and stored to partials at its end. */
  blockSums(count: number): { sums: number[]; reset: () => void; store: (block: number) => void } {
    const f = this.f, L = this.L;
    const sums = Array.from({ length: count }, () => f.local(F64));
    return {
      sums,
      reset: () => { for (const s of sums) f.f64(0).set(s); },
      store: (block) => {
        sums.forEach((s, k) => {
          f.get(block).i32(8 * L.slots).op(Op.i32Mul).get(s).storeF64(L.partials + 8 * k);
        });
      },
    };
  }

  /** scalar `index` of the scalars array, in a local */
  scalar(index: number): number {
    const x = this.f.local(F64);
    this.f.i32(0).loadF64(this.L.scalars + 8 * index).set(x);
    return x;
  }
}

/** The module's imports: the Math functions the rates call. */
function importMath(m: WasmModule): Record<MathImport, number> {
  const out = {} as Record<MathImport, number>;
  for (const name of MATH_IMPORTS) out[name] = m.importFunction('math', name, name === 'atan2' || name === 'pow' ? [F64, F64] : [F64], [F64]);
  return out;
}

/** The host object a stepper module is instantiated with (the same in every thread). */
export function stepperImports(memory: WebAssembly.Memory): WebAssembly.Imports {
  const math: Record<string, (...a: number[]) => number> = {};
  for (const name of MATH_IMPORTS) math[name] = Math[name] as (...a: number[]) => number;
  return { env: { memory }, math };
}

/** Generate the stepper's module (WebAssembly bytes). */
export function stepperModule(plan: StepperKernelPlan): Uint8Array {
  const m = new WasmModule();
  const imports = importMath(m);
  m.importMemory(plan.pages, plan.shared);
  const L = plan.layout, nS = L.shape.nS;
  const rates = plan.kinetics.rates;
  const species = Array.from({ length: nS }, (_, s) => s);

  // explicit(b0, b1, U, O, t): O = U + dt·f(U) − c·(M⁻¹K U)
  {
    const w = new KernelWriter(plan, [I32, I32, I32, I32, F64], [I32]);
    const f = w.f;
    const flag = f.local(I32);
    const constants = w.constantLocals();
    f.i32(0).set(flag);
    w.rows((row) => {
      const { names, u } = w.reactionLocals(row, 2, 4, constants);
      const a = w.rowProducts(row, 2, u);
      for (const s of species) {
        const o = f.local(F64);
        f.get(u[s]).f64(plan.dt);
        emitFormula(f, rates[s], names, imports);
        f.op(Op.f64Mul).op(Op.f64Add);
        if (a[s] >= 0) f.f64(plan.coefficient[s]).get(a[s]).op(Op.f64Mul).op(Op.f64Sub);
        f.set(o);
        f.get(3).get(row.b).op(Op.i32Add).get(o).storeF64(8 * s);
        w.flagNonFinite(flag, o);
      }
    });
    f.get(flag);
    m.addFunction(f, 'explicit');
  }
  // rhs(b0, b1, U, X, t): X = U + dt·f(U)
  {
    const w = new KernelWriter(plan, [I32, I32, I32, I32, F64], [I32]);
    const f = w.f;
    const flag = f.local(I32);
    const constants = w.constantLocals();
    f.i32(0).set(flag);
    w.rows((row) => {
      const { names, u } = w.reactionLocals(row, 2, 4, constants);
      for (const s of species) {
        const g = f.local(F64);
        f.get(u[s]).f64(plan.dt);
        emitFormula(f, rates[s], names, imports);
        f.op(Op.f64Mul).op(Op.f64Add).set(g);
        f.get(3).get(row.b).op(Op.i32Add).get(g).storeF64(8 * s);
        w.flagNonFinite(flag, g);
      }
    });
    f.get(flag);
    m.addFunction(f, 'rhs');
  }
  if (L.shape.cg) addCgSweeps(m, plan);
  else for (const name of ['cgStart', 'cgProduct', 'cgUpdate', 'cgDirection', 'cgTotal', 'cgShift']) m.addFunction(new FunctionBuilder([I32, I32, I32], []), name);
  if (L.shape.growing) {
    addGeometry(m, plan);
    addCheckMove(m, plan);
  } else {
    m.addFunction(new FunctionBuilder([I32, I32, I32], []), 'geometry');
    const stub = new FunctionBuilder([I32, I32, F64], [I32]);
    stub.i32(0);
    m.addFunction(stub, 'checkMove');
  }
  return m.bytes();
}

/**
 * geometry(b0, b1, U): for each row i, its K entries and lumped mass from the
 * triangles around vertex i (the corner table: for each corner, the other two
 * vertices j, k in the triangle's order and the slots of ij and ik in row i).
 * A triangle with twice-area |n| = |(x_j − x_i) × (x_k − x_i)| adds |n|/6 to
 * m_i and, with w = ½·D_t/|n| (D_t = 1 for K), cot_j·|n|·w to the weight of ik
 * (negated), cot_k·|n|·w to that of ij (negated), and both to the diagonal —
 * the cotangent formula of cotanStiffness, summed per row rather than
 * scattered per triangle, so rows are independent and a team splits them.
 */
function addGeometry(m: WasmModule, plan: StepperKernelPlan): void {
  const L = plan.layout, nS = L.shape.nS, W = L.shape.width, sets = L.diagonal.length;
  const w = new KernelWriter(plan, [I32, I32, I32], []);
  const f = w.f;
  const sub = (a: number, b: number, out: number) => f.get(a).get(b).op(Op.f64Sub).set(out);
  const largest = w.blockSums(1);
  const change = largest.sums[0];
  w.rows((row) => {
    const ov0 = f.local(I32), ov1 = f.local(I32), o = f.local(I32);
    const hasOverflow = L.shape.overflowCount > 0;
    if (hasOverflow) {
      f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.overflowOffsets).i32(8).op(Op.i32Mul).set(ov0);
      f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.overflowOffsets + 4).i32(8).op(Op.i32Mul).set(ov1);
    }
    /** for every overflow entry of the row (o its byte offset into an overflow array) */
    const overflowLoop = (body: () => void) => {
      if (!hasOverflow) return;
      f.get(ov0).set(o);
      f.block().loop();
      f.get(o).get(ov1).op(Op.i32GeS).brIf(1);
      body();
      f.get(o).i32(8).op(Op.i32Add).set(o);
      f.br(0).end().end();
    };
    for (let g = 0; g < sets; g++) for (let k = 0; k < W; k++) f.get(row.rwf).f64(0).storeF64(L.weights[g] + 8 * k);
    overflowLoop(() => { for (let g = 0; g < sets; g++) f.get(o).f64(0).storeF64(L.overflow[g]); });
    const diagonal = Array.from({ length: sets }, () => { const d = f.local(F64); f.f64(0).set(d); return d; });
    const area = f.local(F64);
    f.f64(0).set(area);
    const p = f.local(I32);
    f.get(row.i).i32(24).op(Op.i32Mul).set(p);
    const [xi, yi, zi] = [0, 1, 2].map((d) => { const x = f.local(F64); f.get(p).loadF64(L.moved + 8 * d).set(x); return x; });
    const e = f.local(I32), stop = f.local(I32), at = f.local(I32);
    f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.cornerOffsets).set(e);
    f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.cornerOffsets + 4).set(stop);
    f.block().loop();
    f.get(e).get(stop).op(Op.i32GeS).brIf(1);
    f.get(e).i32(4 * CORNER_STRIDE).op(Op.i32Mul).set(at);
    const [pj, pk, sj, sk, t8] = [0, 1, 2, 3, 4].map((c) => { const x = f.local(I32); f.get(at).loadI32(L.corners + 4 * c).set(x); return x; });
    const ej = [0, 1, 2].map(() => f.local(F64)), ek = [0, 1, 2].map(() => f.local(F64)), djk = [0, 1, 2].map(() => f.local(F64));
    [xi, yi, zi].forEach((xd, d) => {
      const xj = f.local(F64), xk = f.local(F64);
      f.get(pj).loadF64(L.moved + 8 * d).set(xj);
      f.get(pk).loadF64(L.moved + 8 * d).set(xk);
      sub(xj, xd, ej[d]);
      sub(xk, xd, ek[d]);
      sub(xk, xj, djk[d]);
    });
    // |n| = |ej × ek|, twice the triangle's area
    const twice = f.local(F64);
    const normal = ([[1, 2], [2, 0], [0, 1]] as const).map(([a, b]) => {
      const c = f.local(F64);
      f.get(ej[a]).get(ek[b]).op(Op.f64Mul).get(ej[b]).get(ek[a]).op(Op.f64Mul).op(Op.f64Sub).set(c);
      return c;
    });
    f.get(normal[0]).get(normal[0]).op(Op.f64Mul).get(normal[1]).get(normal[1]).op(Op.f64Mul).op(Op.f64Add).get(normal[2]).get(normal[2]).op(Op.f64Mul).op(Op.f64Add);
    f.op(Op.f64Sqrt).set(twice);
    f.get(area).get(twice).op(Op.f64Add).set(area);
    // (x_i − x_j)·(x_k − x_j) = −ej·djk, and (x_i − x_k)·(x_j − x_k) = ek·djk
    const dotJ = f.local(F64), dotK = f.local(F64), half = f.local(F64);
    const dot = (a: number[], b: number[]) => { f.get(a[0]).get(b[0]).op(Op.f64Mul).get(a[1]).get(b[1]).op(Op.f64Mul).op(Op.f64Add).get(a[2]).get(b[2]).op(Op.f64Mul).op(Op.f64Add); };
    dot(ej, djk); f.op(Op.f64Neg).set(dotJ);
    dot(ek, djk); f.set(dotK);
    f.f64(0.5).get(twice).op(Op.f64Div).set(half);
    for (let g = 0; g < sets; g++) {
      const wg = f.local(F64), cj = f.local(F64), ck = f.local(F64);
      if (L.triangleCoefficients[g] >= 0) f.get(half).get(t8).loadF64(L.triangleCoefficients[g]).op(Op.f64Mul).set(wg);
      else f.get(half).set(wg);
      f.get(dotJ).get(wg).op(Op.f64Mul).set(cj);
      f.get(dotK).get(wg).op(Op.f64Mul).set(ck);
      f.get(sj).get(sj).loadF64(L.weights[g]).get(ck).op(Op.f64Sub).storeF64(L.weights[g]);
      f.get(sk).get(sk).loadF64(L.weights[g]).get(cj).op(Op.f64Sub).storeF64(L.weights[g]);
      f.get(diagonal[g]).get(cj).get(ck).op(Op.f64Add).op(Op.f64Add).set(diagonal[g]);
    }
    f.get(e).i32(1).op(Op.i32Add).set(e);
    f.br(0).end().end();
    // the moved position becomes the position (no other row reads positions in this sweep)
    for (const [d, x] of [xi, yi, zi].entries()) f.get(p).get(x).storeF64(L.positions + 8 * d);
    // the new mass, and the state carried: U_i ← U_i·m_i(old)/m_i(new)
    const mass = f.local(F64), ratio = f.local(F64);
    f.get(area).f64(6).op(Op.f64Div).set(mass);
    f.get(row.i8).loadF64(L.mass).get(mass).op(Op.f64Div).set(ratio);
    // the largest relative change of a vertex's area, |m(new)/m(old) − 1|, per block
    f.get(change).get(mass).get(row.i8).loadF64(L.mass).op(Op.f64Div).f64(1).op(Op.f64Sub).op(Op.f64Abs).op(Op.f64Max).set(change);
    f.get(row.i8).get(mass).storeF64(L.mass);
    for (let s = 0; s < nS; s++) {
      f.get(2).get(row.b).op(Op.i32Add);
      f.get(2).get(row.b).op(Op.i32Add).loadF64(8 * s).get(ratio).op(Op.f64Mul);
      f.storeF64(8 * s);
    }
    if (plan.rowScaled) {
      const scale = f.local(F64);
      f.f64(1).get(mass).op(Op.f64Div).set(scale);
      for (let g = 0; g < sets; g++) {
        f.get(diagonal[g]).get(scale).op(Op.f64Mul).set(diagonal[g]);
        for (let k = 0; k < W; k++) f.get(row.rwf).get(row.rwf).loadF64(L.weights[g] + 8 * k).get(scale).op(Op.f64Mul).storeF64(L.weights[g] + 8 * k);
      }
      overflowLoop(() => { for (let g = 0; g < sets; g++) f.get(o).get(o).loadF64(L.overflow[g]).get(scale).op(Op.f64Mul).storeF64(L.overflow[g]); });
    }
    for (let g = 0; g < sets; g++) f.get(row.i8).get(diagonal[g]).storeF64(L.diagonal[g]);
    if (L.shape.cg) {
      for (let s = 0; s < nS; s++) {
        const g = plan.weightSet[s];
        f.get(row.b).f64(1).get(mass);
        if (g >= 0) f.f64(plan.coefficient[s]).get(diagonal[g]).op(Op.f64Mul).op(Op.f64Add);
        f.op(Op.f64Div).storeF64(L.inverseDiagonal + 8 * s);
      }
    }
  }, largest.reset, largest.store);
  m.addFunction(f, 'geometry');
}

/** checkMove(b0, b1, r²): see the kernel list. Triangle (i, j, k) is looked at in row i when i < j and i < k. */
function addCheckMove(m: WasmModule, plan: StepperKernelPlan): void {
  const L = plan.layout;
  const w = new KernelWriter(plan, [I32, I32, F64], [I32]);
  const f = w.f;
  const flag = f.local(I32);
  f.i32(0).set(flag);
  w.rows((row) => {
    const p = f.local(I32), e = f.local(I32), stop = f.local(I32), at = f.local(I32), pj = f.local(I32), pk = f.local(I32);
    f.get(row.i).i32(24).op(Op.i32Mul).set(p);
    f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.cornerOffsets).set(e);
    f.get(row.i).i32(4).op(Op.i32Mul).loadI32(L.cornerOffsets + 4).set(stop);
    f.block().loop();
    f.get(e).get(stop).op(Op.i32GeS).brIf(1);
    f.get(e).i32(4 * CORNER_STRIDE).op(Op.i32Mul).set(at);
    f.get(at).loadI32(L.corners).set(pj);
    f.get(at).loadI32(L.corners + 4).set(pk);
    f.get(e).i32(1).op(Op.i32Add).set(e);
    // another row's triangle: next corner
    f.get(pj).get(p).op(Op.i32LeS).get(pk).get(p).op(Op.i32LeS).op(Op.i32Or).brIf(0);
    /** the normal (twice the area vector) of the triangle in the positions at `base` */
    const normal = (base: number) => {
      const u = [0, 1, 2].map(() => f.local(F64)), v = [0, 1, 2].map(() => f.local(F64));
      for (let d = 0; d < 3; d++) {
        const xi = f.local(F64);
        f.get(p).loadF64(base + 8 * d).set(xi);
        f.get(pj).loadF64(base + 8 * d).get(xi).op(Op.f64Sub).set(u[d]);
        f.get(pk).loadF64(base + 8 * d).get(xi).op(Op.f64Sub).set(v[d]);
      }
      return ([[1, 2], [2, 0], [0, 1]] as const).map(([a, b]) => {
        const c = f.local(F64);
        f.get(u[a]).get(v[b]).op(Op.f64Mul).get(u[b]).get(v[a]).op(Op.f64Mul).op(Op.f64Sub).set(c);
        return c;
      });
    };
    const n0 = normal(L.positions), n1 = normal(L.moved);
    const square = (a: number[], b: number[]) => { f.get(a[0]).get(b[0]).op(Op.f64Mul).get(a[1]).get(b[1]).op(Op.f64Mul).op(Op.f64Add).get(a[2]).get(b[2]).op(Op.f64Mul).op(Op.f64Add); };
    const after = f.local(F64);
    square(n1, n1); f.set(after);
    // good: n0·n1 > 0, |n1|² ≥ r²|n0|², |n1|² < ∞ (a NaN fails every comparison)
    square(n0, n1); f.f64(0).op(Op.f64Gt);
    f.get(after).get(2); square(n0, n0); f.op(Op.f64Mul).op(Op.f64Ge).op(Op.i32And);
    f.get(after).f64(Infinity).op(Op.f64Lt).op(Op.i32And);
    f.op(Op.i32Eqz).get(flag).op(Op.i32Or).set(flag);
    f.br(0).end().end();
  });
  f.get(flag);
  m.addFunction(f, 'checkMove');
}

/** The six sweeps of the fused Jacobi-CG solve (see fusedConjugateGradient.ts for the driver). */
function addCgSweeps(m: WasmModule, plan: StepperKernelPlan): void {
  const L = plan.layout, nS = L.shape.nS;
  const species = Array.from({ length: nS }, (_, s) => s);
  const at = (base: number, row: Row, f: FunctionBuilder) => f.get(row.b).i32(base).op(Op.i32Add);
  const diffuses = (s: number) => plan.weightSet[s] >= 0;

  // start: r = −c·K x, p = D⁻¹ r; sums rz rr bb sb (b = m·x)
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const sums = w.blockSums(CG_SLOTS.start * nS);
    w.rows((row) => {
      const mass = f.local(F64);
      f.get(row.i8).loadF64(L.mass).set(mass);
      const x = species.map((s) => { const v = f.local(F64); f.get(2).get(row.b).op(Op.i32Add).loadF64(8 * s).set(v); return v; });
      const a = w.rowProducts(row, 2, x);
      for (const s of species) {
        const bi = f.local(F64), ri = f.local(F64), zi = f.local(F64);
        f.get(mass).get(x[s]).op(Op.f64Mul).set(bi);
        if (diffuses(s)) f.f64(-plan.coefficient[s]).get(a[s]).op(Op.f64Mul).set(ri);
        else f.f64(0).set(ri);
        at(L.r, row, f).get(ri).storeF64(8 * s);
        at(L.inverseDiagonal, row, f).loadF64(8 * s).get(ri).op(Op.f64Mul).set(zi);
        at(L.p, row, f).get(zi).storeF64(8 * s);
        const [rz, rr, bb, sb] = [0, 1, 2, 3].map((k) => sums.sums[k * nS + s]);
        f.get(rz).get(ri).get(zi).op(Op.f64Mul).op(Op.f64Add).set(rz);
        f.get(rr).get(ri).get(ri).op(Op.f64Mul).op(Op.f64Add).set(rr);
        f.get(bb).get(bi).get(bi).op(Op.f64Mul).op(Op.f64Add).set(bb);
        f.get(sb).get(bi).op(Op.f64Add).set(sb);
      }
    }, sums.reset, sums.store);
    m.addFunction(f, 'cgStart');
  }
  // product: q = A p = m·p + c·K p; sum pq
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const sums = w.blockSums(CG_SLOTS.product * nS);
    const P = f.local(I32);
    f.i32(L.p).set(P);
    w.rows((row) => {
      const mass = f.local(F64);
      f.get(row.i8).loadF64(L.mass).set(mass);
      const p = species.map((s) => { const v = f.local(F64); f.get(P).get(row.b).op(Op.i32Add).loadF64(8 * s).set(v); return v; });
      const a = w.rowProducts(row, P, p);
      for (const s of species) {
        const qi = f.local(F64);
        f.get(mass).get(p[s]).op(Op.f64Mul);
        if (diffuses(s)) f.f64(plan.coefficient[s]).get(a[s]).op(Op.f64Mul).op(Op.f64Add);
        f.set(qi);
        at(L.q, row, f).get(qi).storeF64(8 * s);
        f.get(sums.sums[s]).get(p[s]).get(qi).op(Op.f64Mul).op(Op.f64Add).set(sums.sums[s]);
      }
    }, sums.reset, sums.store);
    m.addFunction(f, 'cgProduct');
  }
  // update: x += α p, r −= α q; sums rz = r·D⁻¹r, rr = r·r
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const sums = w.blockSums(CG_SLOTS.update * nS);
    const alpha = species.map((s) => w.scalar(CG_SCALARS.alpha * nS + s));
    w.rows((row) => {
      for (const s of species) {
        const pi = f.local(F64), ri = f.local(F64);
        at(L.p, row, f).loadF64(8 * s).set(pi);
        // x[o] += α·p[o]
        f.get(2).get(row.b).op(Op.i32Add);
        f.get(2).get(row.b).op(Op.i32Add).loadF64(8 * s).get(alpha[s]).get(pi).op(Op.f64Mul).op(Op.f64Add);
        f.storeF64(8 * s);
        // r[o] − α·q[o]
        at(L.r, row, f).loadF64(8 * s).get(alpha[s]);
        at(L.q, row, f).loadF64(8 * s).op(Op.f64Mul).op(Op.f64Sub).set(ri);
        at(L.r, row, f).get(ri).storeF64(8 * s);
        const rz = sums.sums[s], rr = sums.sums[nS + s];
        f.get(rz).get(ri);
        at(L.inverseDiagonal, row, f).loadF64(8 * s).op(Op.f64Mul).get(ri).op(Op.f64Mul).op(Op.f64Add).set(rz);
        f.get(rr).get(ri).get(ri).op(Op.f64Mul).op(Op.f64Add).set(rr);
      }
    }, sums.reset, sums.store);
    m.addFunction(f, 'cgUpdate');
  }
  // direction: p = D⁻¹ r + β p
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const beta = species.map((s) => w.scalar(CG_SCALARS.beta * nS + s));
    w.rows((row) => {
      for (const s of species) {
        at(L.p, row, f);
        at(L.inverseDiagonal, row, f).loadF64(8 * s);
        at(L.r, row, f).loadF64(8 * s).op(Op.f64Mul);
        f.get(beta[s]);
        at(L.p, row, f).loadF64(8 * s).op(Op.f64Mul).op(Op.f64Add);
        f.storeF64(8 * s);
      }
    });
    m.addFunction(f, 'cgDirection');
  }
  // total: sums area = Σ m, mx = Σ m·x
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const sums = w.blockSums(1 + nS);
    w.rows((row) => {
      const mass = f.local(F64);
      f.get(row.i8).loadF64(L.mass).set(mass);
      f.get(sums.sums[0]).get(mass).op(Op.f64Add).set(sums.sums[0]);
      for (const s of species) {
        f.get(sums.sums[1 + s]).get(mass).get(2).get(row.b).op(Op.i32Add).loadF64(8 * s).op(Op.f64Mul).op(Op.f64Add).set(sums.sums[1 + s]);
      }
    }, sums.reset, sums.store);
    m.addFunction(f, 'cgTotal');
  }
  // shift: x += shift
  {
    const w = new KernelWriter(plan, [I32, I32, I32], []);
    const f = w.f;
    const shift = species.map((s) => w.scalar(CG_SCALARS.shift * nS + s));
    w.rows((row) => {
      for (const s of species) {
        f.get(2).get(row.b).op(Op.i32Add);
        f.get(2).get(row.b).op(Op.i32Add).loadF64(8 * s).get(shift[s]).op(Op.f64Add);
        f.storeF64(8 * s);
      }
    });
    m.addFunction(f, 'cgShift');
  }
}
