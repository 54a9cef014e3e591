import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { csrAddDiagonal } from '../linalg/CsrMatrix.ts';
import { SparseCholesky } from '../linalg/SparseCholesky.ts';
import { ellLayout, ellPattern, ellValues, type EllLayout, type EllPattern, type EllValues } from '../linalg/EllMatrix.ts';
import { withPositions, type Mesh } from '../mesh/Mesh.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import type { ReactionDiffusionSystem } from './ReactionDiffusionSystem.ts';
import { compileExplicitKernel, compileImexRhsKernel, type DiffusionKind, type ExplicitKernel, type ImexRhsKernel, type KernelLayout } from './stepKernels.ts';
import { compileFusedCg, type FusedCgSolver } from './fusedConjugateGradient.ts';
import { diffusionStiffness } from './diffusionStiffness.ts';
import type { RowProductPlan } from './rowProductCode.ts';
import { CG_MAX_ITERATIONS, CG_TOLERANCE } from '../defaults.ts';

export type SchemeName = 'explicit' | 'imex';
export type LinearSolverName = 'cg' | 'cholesky';

export interface StepperOptions {
  scheme: SchemeName;
  dt: number;
  /** implicit–explicit only: conjugate gradients (default) or sparse factorisations computed once */
  solver?: LinearSolverName;
  /** keep what `setGeometry` needs to move the surface during the run */
  growing?: boolean;
  /** CG relative residual tolerance (default 1e-8) */
  tolerance?: number;
  /** CG iteration cap per step (default 2000) */
  maxIterations?: number;
}

/**
 * Time stepping of a reaction–diffusion system with P1 surface finite elements
 * and lumped mass m:
 *
 * - `explicit`: forward Euler, U ← U + dt·(F(U) − M⁻¹ D K U). Stable for
 *   dt < 2/(D·λ_max(M⁻¹K)); see `explicitStepLimit`.
 * - `imex`: diffusion implicit, reaction explicit (Barreira, Elliott &
 *   Madzvamuse, J. Math. Biol. 63 (2011)): (M + dt·D·K)U' = M(U + dt·F(U)),
 *   one SPD solve per species, all species solved together by fused Jacobi-CG
 *   warm-started from U + dt·F(U), or by sparse Cholesky factors computed once.
 *
 * The state is vertex-major (see `speciesField`). `step` keeps the state
 * before the step in `previous`, so a step that produces NaN or infinity
 * leaves the last good state in hand.
 */
export class ReactionDiffusionStepper {
  readonly system: ReactionDiffusionSystem;
  readonly options: Required<StepperOptions>;
  readonly vertexCount: number;
  readonly speciesCount: number;
  readonly mass: Float64Array;
  readonly diffusionKinds: readonly DiffusionKind[];
  private readonly layout: EllLayout;
  private readonly sets: EllValues[];
  /** kept for `setGeometry` (a growing surface): the CSR operators, their ELL map, per-triangle D */
  private readonly moving?: { pattern: EllPattern; csr: CsrMatrix[]; triangleD: (Float64Array | undefined)[]; weightSet: number[] };
  private mesh: Mesh;
  private readonly coefficient: Float64Array;
  private readonly constants: Float64Array;
  private readonly fields: (Float64Array | undefined)[];
  private current: Float64Array;
  private other: Float64Array;
  private readonly explicitKernel?: ExplicitKernel;
  private readonly rhsKernel?: ImexRhsKernel;
  private readonly cg?: FusedCgSolver;
  private readonly work?: { r: Float64Array; p: Float64Array; q: Float64Array; inverseDiagonal: Float64Array };
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
    this.options = { solver: 'cg', tolerance: CG_TOLERANCE, maxIterations: CG_MAX_ITERATIONS, growing: false, ...options };
    const { mesh, kinetics } = system;
    this.mesh = mesh;
    const n = mesh.positions.length / 3;
    const nS = kinetics.species.length;
    this.vertexCount = n;
    this.speciesCount = nS;
    const dt = this.options.dt;
    if (!(dt > 0) || !Number.isFinite(dt)) throw new Error(`time step must be a positive number, got ${dt}`);
    if (system.diffusion.length !== nS) throw new Error(`${system.diffusion.length} diffusion coefficients for ${nS} species`);
    // operators assembled by the caller are read, never written: a growing surface reassembles into copies
    const growing = this.options.growing;
    const stiffness = assembled ? (growing ? { ...assembled.stiffness, values: assembled.stiffness.values.slice() } : assembled.stiffness) : cotanStiffness(mesh);
    const mass = assembled ? (growing ? assembled.mass.slice() : assembled.mass) : lumpedMass(mesh);
    this.mass = mass;
    const explicit = this.options.scheme === 'explicit';
    const rowScale = explicit ? mass.map((m) => 1 / m) : undefined;
    const pattern = ellPattern(stiffness, nS);
    const kinds: DiffusionKind[] = [];
    const weightSet: number[] = [];
    const csrOf: CsrMatrix[] = [stiffness];
    const triangleD: (Float64Array | undefined)[] = [];
    this.sets = [ellValues(pattern, stiffness, rowScale)];
    this.coefficient = new Float64Array(nS);
    system.diffusion.forEach((d, s) => {
      if (typeof d === 'number') {
        kinds.push(d === 0 ? 'none' : 'constant');
        weightSet.push(d === 0 ? -1 : 0);
        this.coefficient[s] = dt * d;
      } else {
        kinds.push('field');
        const { matrix: k, triangleD: coefficient } = diffusionStiffness(mesh, d, stiffness);
        triangleD.push(coefficient);
        weightSet.push(this.sets.length);
        csrOf.push(k);
        this.sets.push(ellValues(pattern, k, rowScale));
        this.coefficient[s] = dt;
      }
    });
    this.diffusionKinds = kinds;
    this.layout = ellLayout(pattern);
    if (this.options.growing) this.moving = { pattern, csr: csrOf, triangleD: [undefined, ...triangleD], weightSet };
    const rows: RowProductPlan = { speciesCount: nS, width: pattern.width, hasOverflow: pattern.overflowColumns.length > 0, weightSet };
    this.constants = new Float64Array(system.parameters.map((p) => (typeof p === 'number' ? p : 0)));
    this.fields = system.parameters.map((p) => (typeof p === 'number' ? undefined : p));
    const layout: KernelLayout = { kinetics, rows, fieldParameters: this.fields.map((f) => f !== undefined) };
    this.current = new Float64Array(n * nS);
    this.other = new Float64Array(n * nS);
    this.lastIterations = new Int32Array(nS);
    if (explicit) {
      this.explicitKernel = compileExplicitKernel(layout);
    } else {
      this.rhsKernel = compileImexRhsKernel(layout);
      if (this.options.solver === 'cholesky') {
        this.factors = this.buildFactors(csrOf, weightSet);
        this.column = new Float64Array(n);
        this.solution = new Float64Array(n);
      } else {
        this.cg = compileFusedCg(rows);
        this.work = { r: new Float64Array(n * nS), p: new Float64Array(n * nS), q: new Float64Array(n * nS), inverseDiagonal: new Float64Array(n * nS) };
        this.fillInverseDiagonal(weightSet);
      }
    }
  }

  /** Jacobi preconditioner of the CG solve: 1/(m_i + c_s K_s,ii). */
  private fillInverseDiagonal(weightSet: readonly number[]): void {
    const n = this.vertexCount, nS = this.speciesCount, inv = this.work!.inverseDiagonal;
    for (let i = 0; i < n; i++) {
      for (let s = 0; s < nS; s++) {
        const kii = weightSet[s] < 0 ? 0 : this.sets[weightSet[s]].diagonal[i];
        inv[i * nS + s] = 1 / (this.mass[i] + this.coefficient[s] * kii);
      }
    }
  }

  /**
   * Move the surface (evolving-surface finite elements, Dziuk & Elliott, IMA J.
   * Numer. Anal. 27 (2007)): nodes move with the material velocity and the
   * basis functions with them, so Σ M U is carried unchanged by the motion:
   * U_i ← U_i·m_i(old)/m_i(new), then K and M are reassembled on the new
   * geometry. Dilution by growth is this transfer; nothing else is added.
   * Everything is recomputed from the positions alone, so a run resumed from
   * saved positions continues bit for bit.
   * Needs `growing: true`.
   */
  setGeometry(positions: Float64Array): void {
    const mv = this.moving;
    if (!mv) throw new Error('setGeometry: create the stepper with growing: true');
    this.mesh = withPositions(this.mesh, positions);
    const n = this.vertexCount, nS = this.speciesCount;
    const u = this.current;
    const old = this.mass.slice();
    lumpedMass(this.mesh, this.mass);
    for (let i = 0; i < n; i++) {
      const f = old[i] / this.mass[i];
      for (let s = 0; s < nS; s++) u[i * nS + s] *= f;
    }
    if (this.explicitKernel) {
      // back to the unscaled coefficients: the new weights hold K/m of the new surface
      this.system.diffusion.forEach((d, s) => (this.coefficient[s] = typeof d === 'number' ? this.options.dt * d : this.options.dt));
    }
    const rowScale = this.explicitKernel ? this.mass.map((m) => 1 / m) : undefined;
    mv.csr.forEach((k, g) => {
      cotanStiffness(this.mesh, k, mv.triangleD[g]);
      ellValues(mv.pattern, k, rowScale, this.sets[g]);
    });
    if (this.work) this.fillInverseDiagonal(mv.weightSet);
    if (this.factors) this.refactorAll(mv);
  }

  private refactorAll(mv: NonNullable<ReactionDiffusionStepper['moving']>): void {
    for (const { factor, species } of this.factors!) factor.refactor(this.implicitMatrix(species[0], mv.csr, mv.weightSet));
  }

  /** M + c_s·K_s, the matrix species s solves with in the implicit–explicit step. */
  private implicitMatrix(s: number, csrOf: readonly CsrMatrix[], weightSet: readonly number[]): CsrMatrix {
    const g = weightSet[s];
    const scale = g < 0 ? 0 : this.coefficient[s];
    const k = csrOf[Math.max(0, g)];
    return csrAddDiagonal({ ...k, values: k.values.map((v) => scale * v) }, this.mass);
  }

  /** The surface as it is now (moved by `setGeometry`). */
  get surface(): Mesh {
    return this.mesh;
  }

  /** One factorisation per distinct matrix M + c_s K_s (species with equal D share it). */
  private buildFactors(csrOf: CsrMatrix[], weightSet: number[]): { factor: SparseCholesky; species: number[] }[] {
    const groups: { key: string; species: number[] }[] = [];
    weightSet.forEach((g, s) => {
      const key = g < 0 ? 'none' : `${g}:${this.coefficient[s]}`;
      const found = groups.find((x) => x.key === key);
      if (found) found.species.push(s); else groups.push({ key, species: [s] });
    });
    return groups.map(({ species }) => ({ factor: new SparseCholesky(this.implicitMatrix(species[0], csrOf, weightSet)), species }));
  }

  /** The current state (vertex-major). Write into it to set initial values. */
  get state(): Float64Array {
    return this.current;
  }

  /** The state before the last step. */
  get previous(): Float64Array {
    return this.other;
  }

  /** Replace the current state (copied). */
  setState(values: Float64Array): void {
    if (values.length !== this.current.length) throw new Error(`state has ${values.length} values, expected ${this.current.length}`);
    this.current.set(values);
  }

  /**
   * Advance the state from time t by dt. Returns false if any new value is NaN
   * or infinite; the state before the step is then in `previous`.
   */
  step(t: number): boolean {
    const n = this.vertexCount;
    const dt = this.options.dt;
    const positions = this.mesh.positions;
    let check: number;
    if (this.explicitKernel) {
      check = this.explicitKernel(n, this.layout, this.sets, this.current, this.other, dt, t, this.coefficient, this.constants, this.fields, positions);
    } else {
      check = this.rhsKernel!(n, this.current, this.other, dt, t, this.constants, this.fields, positions);
      if (Number.isFinite(check)) {
        if (this.cg) {
          const w = this.work!;
          this.totalIterations += this.cg(n, this.layout, this.sets, this.mass, this.coefficient, w.inverseDiagonal, this.other, w.r, w.p, w.q, this.options.tolerance, this.options.maxIterations, this.lastIterations);
        } else {
          this.solveFactored();
        }
        check = 0;
        const x = this.other;
        for (let i = 0; i < x.length; i++) check += x[i];
      }
    }
    const before = this.current;
    this.current = this.other;
    this.other = before;
    this.stepsTaken++;
    return Number.isFinite(check);
  }

  private solveFactored(): void {
    const n = this.vertexCount, nS = this.speciesCount;
    const col = this.column!, sol = this.solution!, x = this.other, m = this.mass;
    for (const { factor, species } of this.factors!) {
      for (const s of species) {
        for (let i = 0; i < n; i++) col[i] = m[i] * x[i * nS + s]; // right-hand side M·(U + dt·F(U))
        factor.solve(col, sol);
        for (let i = 0; i < n; i++) x[i * nS + s] = sol[i];
      }
    }
  }

  /** Bytes held by this stepper's own arrays (operators, state, work vectors; not the mesh). */
  bytes(): number {
    const arrays: (ArrayBufferView | undefined)[] = [
      this.layout.columns, this.layout.overflowOffsets, this.layout.overflowColumns, this.mass, this.current, this.other,
      this.work?.r, this.work?.p, this.work?.q, this.work?.inverseDiagonal, this.column, this.solution,
      ...this.fields, ...this.sets.flatMap((s) => [s.diagonal, s.weights, s.overflow]),
    ];
    let total = arrays.reduce((acc, a) => acc + (a?.byteLength ?? 0), 0);
    for (const f of this.factors ?? []) total += f.factor.values.byteLength + f.factor.rowIndices.byteLength + f.factor.colOffsets.byteLength;
    return total;
  }
}
