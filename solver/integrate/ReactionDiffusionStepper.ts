import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { csrAddDiagonal } from '../linalg/CsrMatrix.ts';
import { SparseCholesky } from '../linalg/SparseCholesky.ts';
import { csrFromEll, ellPattern, ellValues, type EllPattern, type EllValues } from '../linalg/EllMatrix.ts';
import { withPositions, type Mesh } from '../mesh/Mesh.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import type { ReactionDiffusionSystem } from './ReactionDiffusionSystem.ts';
import { diffusionStiffness, triangleMeans } from './diffusionStiffness.ts';
import { fillGeometryCorners } from './wasm/geometryCorners.ts';
import { CORNER_STRIDE, stepperLayout, type StepperLayout } from './wasm/stepperLayout.ts';
import { stepperImports, stepperModule, CG_SCALARS, CG_SLOTS, type StepperExports } from './wasm/stepperModule.ts';
import type { TeamKernel, ThreadTeam } from './ThreadTeam.ts';
import { CG_MAX_ITERATIONS, CG_TOLERANCE } from '../defaults.ts';

export type SchemeName = 'explicit' | 'imex';
export type LinearSolverName = 'cg' | 'cholesky';
/** How each species diffuses: not at all, with a constant D (shared K), or with its own D-weighted stiffness. */
export type DiffusionKind = 'none' | 'constant' | 'field';

export interface StepperOptions {
  scheme: SchemeName;
  dt: number;
  /** implicit–explicit only: conjugate gradients (default) or sparse factorisations computed once */
  solver?: LinearSolverName;
  /** keep what `setGeometry` needs to move the surface during the run */
  growing?: boolean;
  /** CG relative residual tolerance (default CG_TOLERANCE) */
  tolerance?: number;
  /** CG iteration cap per step (default CG_MAX_ITERATIONS) */
  maxIterations?: number;
  /** threads to step with: a team made by the caller (default: this thread alone); results do not depend on it */
  team?: ThreadTeam;
}

/**
 * Time stepping of a reaction–diffusion system with P1 surface finite elements
 * and lumped mass m:
 *
 * - `explicit`: forward Euler, U ← U + dt·(F(U) − M⁻¹ D K U). Stable for
 *   dt < 2/(D·λ_max(M⁻¹K)); see `explicitStepLimit`.
 * - `imex`: diffusion implicit, reaction explicit (Barreira, Elliott &
 *   Madzvamuse, J. Math. Biol. 63 (2011)): (M + dt·D·K)U' = M(U + dt·F(U)),
 *   all species solved together by Jacobi-CG warm-started from U + dt·F(U)
 *   (Hestenes & Stiefel 1952; Saad, "Iterative Methods for Sparse Linear
 *   Systems", 2nd ed., alg. 9.1), or by sparse Cholesky factors computed once.
 *
 * The sweeps are WebAssembly generated for this system (stepperModule) over
 * one memory holding every per-vertex array (stepperLayout); with a team they
 * run on several threads sharing that memory, with the same results to the
 * bit. The state is vertex-major (see `speciesField`). `step` keeps the state
 * before the step in `previous`, so a step that produces NaN or infinity (or a
 * failed thread) leaves the last good state in hand.
 */
export class ReactionDiffusionStepper {
  readonly system: ReactionDiffusionSystem;
  readonly options: Required<Omit<StepperOptions, 'team'>>;
  readonly vertexCount: number;
  readonly speciesCount: number;
  readonly diffusionKinds: readonly DiffusionKind[];
  /** threads the sweeps run on (1 on small meshes, however large the team) */
  readonly threads: number;
  private readonly layout: StepperLayout;
  private readonly memory: WebAssembly.Memory;
  private readonly kernels: StepperExports;
  private readonly team?: ThreadTeam;
  private readonly module: WebAssembly.Module;
  private readonly pattern: EllPattern;
  private readonly sets: EllValues[];
  private readonly coefficient: Float64Array;
  private readonly weightSet: number[];
  private readonly stateViews: [Float64Array, Float64Array];
  private current = 0;
  /** kept for `setGeometry` of a growing surface with factorised solves: the CSR pattern the factors' matrices take */
  private readonly moving?: { pattern: CsrMatrix };
  private mesh: Mesh;
  private readonly factors?: { factor: SparseCholesky; species: number[] }[];
  private readonly column?: Float64Array;
  private readonly solution?: Float64Array;
  /** CG iterations of the last step, per species (−1: not converged) */
  readonly lastIterations: Int32Array;
  /** sum over all steps of the largest per-species CG iteration count */
  totalIterations = 0;
  stepsTaken = 0;

  /** `assembled`: K and lumped M of `system.mesh` when the caller has them already (they are not modified). */
  constructor(system: ReactionDiffusionSystem, options: StepperOptions, assembled?: { stiffness: CsrMatrix; mass: Float64Array }) {
    this.system = system;
    const { team, ...rest } = options;
    this.options = { solver: 'cg', tolerance: CG_TOLERANCE, maxIterations: CG_MAX_ITERATIONS, growing: false, ...rest };
    const { mesh, kinetics } = system;
    this.mesh = mesh;
    const n = mesh.positions.length / 3;
    const nS = kinetics.species.length;
    this.vertexCount = n;
    this.speciesCount = nS;
    const dt = this.options.dt;
    if (!(dt > 0) || !Number.isFinite(dt)) throw new Error(`time step must be a positive number, got ${dt}`);
    if (system.diffusion.length !== nS) throw new Error(`${system.diffusion.length} diffusion coefficients for ${nS} species`);
    // operators assembled by the caller are read, never written (a growing surface reassembles in the stepper's memory)
    const growing = this.options.growing;
    const stiffness = assembled ? assembled.stiffness : cotanStiffness(mesh);
    const mass = assembled ? assembled.mass : lumpedMass(mesh);
    const explicit = this.options.scheme === 'explicit';
    const cholesky = !explicit && this.options.solver === 'cholesky';
    this.pattern = ellPattern(stiffness, nS);
    // weight sets: K for every constant D, a D-weighted K per field D
    const kinds: DiffusionKind[] = [];
    this.weightSet = [];
    const csrOf: CsrMatrix[] = [stiffness];
    const triangleD: (Float64Array | undefined)[] = [undefined];
    this.coefficient = new Float64Array(nS);
    system.diffusion.forEach((d, s) => {
      if (typeof d === 'number') {
        kinds.push(d === 0 ? 'none' : 'constant');
        this.weightSet.push(d === 0 ? -1 : 0);
        this.coefficient[s] = dt * d;
      } else {
        kinds.push('field');
        const { matrix, triangleD: coefficient } = growing ? { matrix: stiffness, triangleD: triangleMeans(mesh.triangles, d) } : diffusionStiffness(mesh, d, stiffness);
        this.weightSet.push(csrOf.length);
        csrOf.push(matrix);
        triangleD.push(coefficient);
        this.coefficient[s] = dt;
      }
    });
    this.diffusionKinds = kinds;
    if (growing && cholesky) this.moving = { pattern: stiffness };

    // one memory for every array the kernels touch
    const usesPositions = kinetics.uses.x || kinetics.uses.y || kinetics.uses.z;
    this.layout = stepperLayout({
      n, nS, width: this.pattern.width, overflowCount: this.pattern.overflowColumns.length, sets: csrOf.length,
      fieldParameters: system.parameters.map((p) => typeof p !== 'number'), usesPositions, cg: !explicit && !cholesky,
      growing: growing ? { corners: mesh.triangles.length, triangles: mesh.triangles.length / 3 } : undefined,
    });
    const L = this.layout;
    const members = team ? Math.max(1, Math.min(team.size, Math.floor(L.blocks / team.minBlocksPerMember))) : 1;
    this.threads = members;
    const shared = members > 1;
    const pages = Math.ceil(L.bytes / 65536) + 1;
    this.memory = new WebAssembly.Memory(shared ? { initial: pages, maximum: pages, shared: true } : { initial: pages, maximum: pages });
    const buffer = this.memory.buffer;
    const f64 = (at: number, length: number) => new Float64Array(buffer, at, length);
    const i32 = (at: number, length: number) => new Int32Array(buffer, at, length);
    // neighbours as byte offsets of their state (the layout's columns already count the species)
    const columns = i32(L.columns, n * this.pattern.width);
    for (let k = 0; k < columns.length; k++) columns[k] = 8 * this.pattern.columns[k];
    i32(L.overflowOffsets, n + 1).set(this.pattern.overflowOffsets);
    const overflowColumns = i32(L.overflowColumns, this.pattern.overflowColumns.length);
    for (let k = 0; k < overflowColumns.length; k++) overflowColumns[k] = 8 * this.pattern.overflowColumns[k];
    f64(L.mass, n).set(mass);
    this.sets = csrOf.map((_, g) => ({ diagonal: f64(L.diagonal[g], n), weights: f64(L.weights[g], n * L.shape.width), overflow: f64(L.overflow[g], L.shape.overflowCount) }));
    system.parameters.forEach((p, k) => { if (typeof p !== 'number') f64(L.fields[k]!, n).set(p); });
    if (L.positions >= 0) f64(L.positions, 3 * n).set(mesh.positions);
    if (L.moved >= 0) f64(L.moved, 3 * n).set(mesh.positions);
    this.stateViews = [f64(L.states[0], n * nS), f64(L.states[1], n * nS)];
    this.lastIterations = new Int32Array(nS);

    const bytes = stepperModule({
      layout: L, kinetics, weightSet: this.weightSet, coefficient: Array.from(this.coefficient), dt, rowScaled: explicit,
      constants: system.parameters.map((p) => (typeof p === 'number' ? p : 0)), shared, pages,
    });
    this.module = new WebAssembly.Module(bytes as BufferSource);
    this.kernels = new WebAssembly.Instance(this.module, stepperImports(this.memory)).exports as unknown as StepperExports;
    if (shared && team) this.team = team;

    if (growing) {
      // every K and M of a moving surface, the first included, from the geometry kernel (a resumed run reassembles alike)
      fillGeometryCorners(mesh, this.pattern, stiffness, i32(L.cornerOffsets, n + 1), i32(L.corners, CORNER_STRIDE * L.shape.growing!.corners));
      triangleD.forEach((d, g) => { if (d) f64(L.triangleCoefficients[g], d.length).set(d); });
      this.run('geometry', L.states[this.current]);
    } else {
      this.fillWeights(csrOf);
      if (L.shape.cg) this.fillInverseDiagonal();
    }
    if (cholesky) {
      this.factors = this.buildFactors(growing ? this.csrOperators() : csrOf);
      this.column = new Float64Array(n);
      this.solution = new Float64Array(n);
    }
  }

  /** The surface as it is now (moved by `setGeometry`). */
  get surface(): Mesh {
    return this.mesh;
  }

  /** Lumped mass of the current surface (a view into the stepper's memory). */
  get mass(): Float64Array {
    return new Float64Array(this.memory.buffer, this.layout.mass, this.vertexCount);
  }

  /** The current state (vertex-major), a view into the stepper's memory. Write into it to set initial values. */
  get state(): Float64Array {
    return this.stateViews[this.current];
  }

  /** The state before the last step. */
  get previous(): Float64Array {
    return this.stateViews[1 - this.current];
  }

  /** Replace the current state (copied). */
  setState(values: Float64Array): void {
    if (values.length !== this.state.length) throw new Error(`state has ${values.length} values, expected ${this.state.length}`);
    this.state.set(values);
  }

  /**
   * Advance the state from time t by dt. Returns false if any new value is NaN
   * or infinite; the state before the step is then in `previous`. A failing
   * thread throws (ThreadError) with the state before the step in `previous`.
   */
  step(t: number): boolean {
    const L = this.layout;
    const from = L.states[this.current], to = L.states[1 - this.current];
    let finite: boolean;
    if (this.options.scheme === 'explicit') {
      finite = this.run('explicit', from, to, t) === 0;
    } else {
      finite = this.run('rhs', from, to, t) === 0;
      if (finite) finite = this.factors ? this.solveFactored() : this.solveCg(to);
    }
    this.current = 1 - this.current;
    this.stepsTaken++;
    return finite;
  }

  /** A kernel over every reduction block, on this thread or the team's. */
  private run(kernel: TeamKernel, a0 = 0, a1 = 0, a2 = 0): number {
    const blocks = this.layout.blocks;
    if (this.team) {
      this.team.load(this, this.module, this.memory, this.kernels as unknown as Record<string, (...a: number[]) => number>);
      return this.team.run(kernel, blocks, this.threads, a0, a1, a2);
    }
    return (this.kernels[kernel] as (...a: number[]) => number)(0, blocks, a0, a1, a2) | 0;
  }

  /** Sums of the first `count` partial-sum slots over the blocks, in block order. */
  private reduce(count: number): Float64Array {
    const L = this.layout;
    const partials = new Float64Array(this.memory.buffer, L.partials, L.blocks * L.slots);
    const out = new Float64Array(count);
    for (let b = 0; b < L.blocks; b++) for (let k = 0; k < count; k++) out[k] += partials[b * L.slots + k];
    return out;
  }

  /**
   * The fused Jacobi-CG solve of (diag(m) + c_s·K_s)·x_s = m·g_s for every
   * species, x (at byte offset `x`) holding g on entry: each species stops when
   * ‖r_s‖₂ ≤ tol·‖b_s‖₂, then is shifted by a constant so that Σ m·x_s =
   * Σ m·g_s (which the exact solution satisfies because 1ᵀK_s = 0), so the
   * total amount is conserved to round-off. Returns false if the solution is
   * not finite.
   */
  private solveCg(x: number): boolean {
    const nS = this.speciesCount, L = this.layout;
    const scalars = new Float64Array(this.memory.buffer, L.scalars, 4 * nS);
    const { tolerance, maxIterations } = this.options;
    this.run('cgStart', x);
    const start = this.reduce(CG_SLOTS.start * nS);
    const rz = start.slice(0, nS);
    const threshold = new Float64Array(nS), done = new Uint8Array(nS);
    let remaining = nS;
    for (let s = 0; s < nS; s++) {
      threshold[s] = tolerance * tolerance * start[2 * nS + s];
      done[s] = start[nS + s] <= threshold[s] ? 1 : 0;
      this.lastIterations[s] = done[s] ? 0 : -1;
      if (done[s]) remaining--;
    }
    let it = 0;
    while (remaining > 0 && it < maxIterations) {
      it++;
      this.run('cgProduct');
      const pq = this.reduce(CG_SLOTS.product * nS);
      for (let s = 0; s < nS; s++) scalars[CG_SCALARS.alpha * nS + s] = done[s] ? 0 : rz[s] / pq[s];
      this.run('cgUpdate', x);
      const updated = this.reduce(CG_SLOTS.update * nS);
      for (let s = 0; s < nS; s++) {
        scalars[CG_SCALARS.beta * nS + s] = 0;
        if (done[s]) continue;
        if (updated[nS + s] <= threshold[s]) {
          done[s] = 1;
          this.lastIterations[s] = it;
          remaining--;
        } else {
          scalars[CG_SCALARS.beta * nS + s] = updated[s] / rz[s];
          rz[s] = updated[s];
        }
      }
      if (remaining > 0) this.run('cgDirection');
    }
    this.totalIterations += it;
    this.run('cgTotal', x);
    const totals = this.reduce(1 + nS);
    let finite = Number.isFinite(totals[0]);
    for (let s = 0; s < nS; s++) {
      scalars[CG_SCALARS.shift * nS + s] = (start[3 * nS + s] - totals[1 + s]) / totals[0];
      finite &&= Number.isFinite(totals[1 + s]);
    }
    this.run('cgShift', x);
    return finite;
  }

  private solveFactored(): boolean {
    const n = this.vertexCount, nS = this.speciesCount;
    const col = this.column!, sol = this.solution!, x = this.stateViews[1 - this.current], m = this.mass;
    let check = 0;
    for (const { factor, species } of this.factors!) {
      for (const s of species) {
        for (let i = 0; i < n; i++) col[i] = m[i] * x[i * nS + s]; // right-hand side M·(U + dt·F(U))
        factor.solve(col, sol);
        for (let i = 0; i < n; i++) {
          x[i * nS + s] = sol[i];
          check += sol[i];
        }
      }
    }
    return Number.isFinite(check);
  }

  /**
   * Move the surface (evolving-surface finite elements, Dziuk & Elliott, IMA J.
   * Numer. Anal. 27 (2007)): nodes move with the material velocity and the
   * basis functions with them, so Σ M U is carried unchanged by the motion:
   * U_i ← U_i·m_i(old)/m_i(new), then K and M are reassembled on the new
   * geometry. Dilution by growth is this transfer; nothing else is added.
   * The geometry kernel does all of it row by row (threads split the rows);
   * everything is recomputed from the positions alone, so a run resumed from
   * saved positions continues bit for bit. Needs `growing: true`. A failing
   * thread leaves the state and surface as they were and throws ThreadError.
   * Returns the largest relative change of a vertex's area, |m(new)/m(old) − 1|.
   */
  setGeometry(positions: Float64Array): number {
    if (!this.options.growing) throw new Error('setGeometry: create the stepper with growing: true');
    const L = this.layout;
    const kept = this.previous;
    kept.set(this.state);
    new Float64Array(this.memory.buffer, L.moved, 3 * this.vertexCount).set(positions);
    try {
      this.run('geometry', L.states[this.current]);
    } catch (e) {
      // a thread failed half-way: the state as it was, the surface not moved (the run stops here)
      this.state.set(kept);
      new Float64Array(this.memory.buffer, L.positions, 3 * this.vertexCount).set(this.mesh.positions);
      throw e;
    }
    this.mesh = withPositions(this.mesh, positions);
    if (this.factors) {
      const csr = this.csrOperators();
      for (const { factor, species } of this.factors) factor.refactor(this.implicitMatrix(species[0], csr));
    }
    const partials = new Float64Array(this.memory.buffer, L.partials, L.blocks * L.slots);
    let change = 0;
    for (let b = 0; b < L.blocks; b++) change = Math.max(change, partials[b * L.slots]);
    return change;
  }

  /**
   * Whether moving the surface to `positions` keeps every triangle on its side
   * with at least `collapseRatio` of its area and finite (a sweep over the
   * rows, split among the team). Needs `growing: true`.
   */
  checkMove(positions: Float64Array, collapseRatio: number): boolean {
    if (!this.options.growing) throw new Error('checkMove: create the stepper with growing: true');
    new Float64Array(this.memory.buffer, this.layout.moved, 3 * this.vertexCount).set(positions);
    return this.run('checkMove', collapseRatio * collapseRatio) === 0;
  }

  /** The weight sets as CSR matrices (a growing surface's factorised solves). */
  private csrOperators(): CsrMatrix[] {
    return this.sets.map((v) => csrFromEll(this.pattern, v, this.moving!.pattern));
  }

  /** ELL values of every weight set: K (rows scaled by 1/m for the explicit scheme) into the memory. */
  private fillWeights(csrOf: readonly CsrMatrix[]): void {
    const rowScale = this.options.scheme === 'explicit' ? this.mass.map((m) => 1 / m) : undefined;
    csrOf.forEach((k, g) => ellValues(this.pattern, k, rowScale, this.sets[g]));
  }

  /** Jacobi preconditioner of the CG solve: 1/(m_i + c_s K_s,ii). */
  private fillInverseDiagonal(): void {
    const n = this.vertexCount, nS = this.speciesCount;
    const inv = new Float64Array(this.memory.buffer, this.layout.inverseDiagonal, n * nS), mass = this.mass;
    for (let i = 0; i < n; i++) {
      for (let s = 0; s < nS; s++) {
        const g = this.weightSet[s];
        const kii = g < 0 ? 0 : this.sets[g].diagonal[i];
        inv[i * nS + s] = 1 / (mass[i] + this.coefficient[s] * kii);
      }
    }
  }

  /** M + c_s·K_s, the matrix species s solves with in the implicit–explicit step. */
  private implicitMatrix(s: number, csrOf: readonly CsrMatrix[]): CsrMatrix {
    const g = this.weightSet[s];
    const scale = g < 0 ? 0 : this.coefficient[s];
    const k = csrOf[Math.max(0, g)];
    return csrAddDiagonal({ ...k, values: k.values.map((v) => scale * v) }, this.mass);
  }

  /** One factorisation per distinct matrix M + c_s K_s (species with equal D share it). */
  private buildFactors(csrOf: CsrMatrix[]): { factor: SparseCholesky; species: number[] }[] {
    const groups: { key: string; species: number[] }[] = [];
    this.weightSet.forEach((g, s) => {
      const key = g < 0 ? 'none' : `${g}:${this.coefficient[s]}`;
      const found = groups.find((x) => x.key === key);
      if (found) found.species.push(s); else groups.push({ key, species: [s] });
    });
    return groups.map(({ species }) => ({ factor: new SparseCholesky(this.implicitMatrix(species[0], csrOf)), species }));
  }

  /** Bytes held by this stepper (its memory with every per-vertex array, and factors; not the mesh). */
  bytes(): number {
    let total = this.layout.bytes + (this.column?.byteLength ?? 0) + (this.solution?.byteLength ?? 0);
    for (const f of this.factors ?? []) total += f.factor.values.byteLength + f.factor.rowIndices.byteLength + f.factor.colOffsets.byteLength;
    return total;
  }
}
