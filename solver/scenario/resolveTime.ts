import type { ResolveContext } from './Problems.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import type { Linearisation } from './linearisation.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { systemExplicitLimit, type ExplicitStepLimit } from '../integrate/explicitStepLimit.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { smallMatrixEigenvalues } from '../analysis/smallMatrixEigenvalues.ts';
import { intrinsicDelaunayOperators } from '../fem/intrinsicDelaunay.ts';
import { AUTO_CHOLESKY_STIFFNESS, AUTO_CHOLESKY_VERTICES, CG_TOLERANCE, EXPLICIT_STEP_FRACTION, MAX_RUN_STEPS, OUTPUTS_PER_RUN, REACTION_STEP_FRACTION } from '../defaults.ts';

export interface TimePlan {
  scheme: 'imex' | 'explicit';
  dt: number;
  end: number;
  steps: number;
  solver: 'cg' | 'cholesky';
  /** why this solver, for the record */
  solverReason: string;
  tolerance: number;
  explicitLimit?: ExplicitStepLimit;
  /** forward-Euler limit of the reactions at the steady state (when known) */
  reactionLimit?: number;
  /** the Laplacian behind the operators, and (intrinsic Delaunay) how many edges were flipped */
  laplacian: 'cotangent' | 'intrinsic-delaunay';
  flips?: number;
  /** K and lumped M of the start mesh (the step limits are computed from them; the stepper reuses them) */
  operators: { stiffness: CsrMatrix; mass: Float64Array };
}

/** Checks of the time section that need no mesh. */
export function checkScheme(ctx: ResolveContext): void {
  const time = ctx.source.scenario.time;
  if (time.solver && (time.scheme ?? 'imex') === 'explicit') ctx.problems.add(['time', 'solver'], 'the explicit scheme solves no linear systems; remove "solver" or use scheme: imex');
}

/**
 * The time step and linear solver. Default step: the model's suggestion (own
 * kinetics must give one for IMEX), never above REACTION_STEP_FRACTION of the
 * reactions' forward-Euler limit at the steady state nor (explicit) above
 * EXPLICIT_STEP_FRACTION of the positivity bound; it fits a whole number of
 * times into the output interval. A given step beyond the explicit diffusion
 * limit 2/(D·λmax) or the reactions' limit is refused unless
 * `time.allowUnstable`, then warned about. `solver: auto` factorises when CG
 * would need many iterations.
 */
export function resolveTime(ctx: ResolveContext, kin: KineticsPlan, system: ReactionDiffusionSystem, lin: Linearisation, uniformSteady: number[] | undefined): TimePlan {
  const { problems, warnings } = ctx;
  const sc = ctx.source.scenario;
  const model = kin.model;
  const mesh = system.mesh;
  const n = mesh.positions.length / 3;
  const scheme = sc.time.scheme ?? 'imex';
  const requested = sc.time.solver ?? 'auto';
  // the Laplacian: the mesh's cotangent one, or that of its intrinsic Delaunay triangulation (fixed surfaces, constant D)
  const laplacian = sc.fem?.laplacian ?? 'cotangent';
  if (laplacian === 'intrinsic-delaunay') {
    if (sc.growth) problems.add(['fem', 'laplacian'], 'intrinsic-delaunay is for fixed surfaces: a growing surface reassembles the cotangent operators at every move; remove growth or use laplacian: cotangent');
    if (system.diffusion.some((d) => typeof d !== 'number')) problems.add(['fem', 'laplacian'], 'intrinsic-delaunay takes constant diffusion coefficients; a diffusion field needs laplacian: cotangent');
    problems.fail(ctx.file);
  }
  const idt = laplacian === 'intrinsic-delaunay' ? intrinsicDelaunayOperators(mesh) : undefined;
  const stiffness = idt ? idt.stiffness : cotanStiffness(mesh);
  const mass = idt ? idt.mass : lumpedMass(mesh);
  const end = sc.time.end;
  let dt = sc.time.step;
  let explicitLimit: ExplicitStepLimit | undefined;
  /** a default step no larger than `largest` that fits a whole number of times into the output interval (or the end time) */
  const wholeSteps = (largest: number) => {
    const base = sc.output?.every ?? end / OUTPUTS_PER_RUN;
    return base / Math.ceil(base / largest - 1e-9);
  };
  // the reactions are stepped explicitly in both schemes: forward Euler is stable at the steady
  // state only if |1 + dt·λ| ≤ 1 for every eigenvalue λ of its Jacobian, i.e. dt ≤ −2 Re λ/|λ|²
  const reactionLimit = (uniformSteady || !model?.steadyStates) ? reactionStepLimit(lin, kin.species.length) : undefined;
  const allow = sc.time.allowUnstable === true;
  /** a given step beyond a limit: refused, or (allowUnstable) run with a warning naming the limit */
  const beyond = (message: string) => {
    if (allow) warnings.push(`time.step ${message} (time.allowUnstable: true)`);
    else problems.add(['time', 'step'], `${message}; or, to study the instability itself, add time.allowUnstable: true`);
  };
  if (scheme === 'explicit') explicitLimit = systemExplicitLimit(system, stiffness, mass);
  if (dt === undefined) {
    if (scheme === 'imex' && model?.suggestedStep === undefined) {
      problems.add(['time'], OWN_KINETICS_STEP);
    } else {
      const reactions = reactionLimit ? REACTION_STEP_FRACTION * reactionLimit.limit : Infinity;
      const diffusion = explicitLimit ? EXPLICIT_STEP_FRACTION * explicitLimit.safeUpTo : Infinity;
      dt = wholeSteps(Math.min(diffusion, reactions, model?.suggestedStep ?? Infinity, end / 10));
    }
  } else {
    if (explicitLimit && dt > explicitLimit.unstableAbove) {
      beyond(`${dt} is above the explicit scheme's stability limit ${short(explicitLimit.unstableAbove)} on this mesh (2/(D·λmax)); use step ≤ ${short(explicitLimit.safeUpTo)}, or scheme: imex`);
    } else if (explicitLimit && dt > explicitLimit.safeUpTo) {
      warnings.push(`time.step ${dt} exceeds the explicit scheme's positivity bound ${explicitLimit.safeUpTo.toPrecision(3)} on this mesh: values may oscillate or turn negative; ${explicitLimit.unstableAbove.toPrecision(3)} is certainly unstable`);
    }
    if (reactionLimit && dt > reactionLimit.limit * (1 + 1e-12)) {
      beyond(`${dt} makes the explicit reaction update unstable at the steady state (|1 + dt·λ| = ${reactionLimit.growth(dt).toPrecision(4)} > 1, homogeneous oscillations grow): the reactions' limit is ${short(reactionLimit.limit)}; use time.step ≤ ${short(REACTION_STEP_FRACTION * reactionLimit.limit)}`);
    }
  }
  problems.fail(ctx.file);
  const step = dt!;
  let solver: 'cg' | 'cholesky' = requested === 'auto' ? 'cg' : requested;
  let solverReason = requested === 'auto' ? (sc.growth ? 'auto: a growing surface changes M + dt·D·K at every geometry update, CG follows it at no cost' : 'auto') : 'requested';
  if (scheme === 'imex' && requested === 'auto' && !sc.growth && n <= AUTO_CHOLESKY_VERTICES) {
    const stiffnessRatio = step * systemExplicitLimit(system, stiffness, mass).largestRate;
    if (stiffnessRatio > AUTO_CHOLESKY_STIFFNESS) {
      solver = 'cholesky';
      solverReason = `auto: dt·D·λmax = ${stiffnessRatio.toPrecision(3)} > ${AUTO_CHOLESKY_STIFFNESS} would slow CG`;
    } else solverReason = `auto: dt·D·λmax = ${stiffnessRatio.toPrecision(3)}, CG converges in few iterations`;
  }
  const steps = Math.max(1, Math.ceil(end / step - 1e-9));
  if (!(steps <= MAX_RUN_STEPS)) {
    problems.add(['time', sc.time.step !== undefined ? 'step' : 'end'], `time.end ${end} / time.step ${step} is ${steps.toExponential(2)} steps, more than the ${MAX_RUN_STEPS.toExponential(0)} a run may take: shorten time.end or lengthen time.step`);
    problems.fail(ctx.file);
  }
  if (Math.abs(steps * step - end) > 1e-9 * end) warnings.push(`time.end ${end} is not a whole number of steps of ${step}; the run ends at ${steps * step}`);
  return { scheme, dt: step, end, steps, solver, solverReason, tolerance: sc.time.tolerance ?? CG_TOLERANCE, explicitLimit, reactionLimit: reactionLimit?.limit, operators: { stiffness, mass }, laplacian, flips: idt?.flips };
}

/** A step for a message: three figures, in exponent form when small. */
function short(x: number): string {
  return x < 1e-3 ? x.toExponential(2) : x.toPrecision(3);
}

/**
 * The largest step forward Euler takes stably through the reactions at the steady state: the
 * minimum over the Jacobian's eigenvalues λ with Re λ < 0 of −2 Re λ/|λ|² (|1 + dt·λ| ≤ 1), with
 * the amplification |1 + dt·λ| at a given step. Undefined without a Jacobian or a finite limit.
 */
function reactionStepLimit(lin: Linearisation, nS: number): { limit: number; growth: (dt: number) => number } | undefined {
  const J = lin.jacobian();
  if (!J) return undefined;
  const eigen = smallMatrixEigenvalues(J, nS);
  let limit = Infinity;
  for (const [re, im] of eigen) if (re < 0) limit = Math.min(limit, (-2 * re) / (re * re + im * im));
  if (!Number.isFinite(limit)) return undefined;
  return { limit, growth: (dt) => Math.max(...eigen.map(([re, im]) => Math.hypot(1 + dt * re, dt * im))) };
}

/** The problem of your own kinetics without a step (found early with the other requirements, again here). */
export const OWN_KINETICS_STEP = 'missing "step": for your own kinetics give a time step (the implicit–explicit scheme is stable for any step in diffusion, but the reactions set the accuracy)';
