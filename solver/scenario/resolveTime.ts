import type { ResolveContext } from './Problems.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import type { Linearisation } from './linearisation.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import type { CsrMatrix } from '../linalg/CsrMatrix.ts';
import { systemExplicitLimit, type ExplicitStepLimit } from '../integrate/explicitStepLimit.ts';
import { cotanStiffness } from '../fem/cotanStiffness.ts';
import { lumpedMass } from '../fem/lumpedMass.ts';
import { smallMatrixEigenvalues } from '../analysis/smallMatrixEigenvalues.ts';
import { AUTO_CHOLESKY_STIFFNESS, AUTO_CHOLESKY_VERTICES, CG_TOLERANCE, EXPLICIT_STEP_FRACTION, MAX_RUN_STEPS, OUTPUTS_PER_RUN } from '../defaults.ts';

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
  /** K and lumped M of the start mesh (the step limits are computed from them; the stepper reuses them) */
  operators: { stiffness: CsrMatrix; mass: Float64Array };
}

/** Checks of the time section that need no mesh. */
export function checkScheme(ctx: ResolveContext): void {
  const time = ctx.source.scenario.time;
  if (time.solver && (time.scheme ?? 'imex') === 'explicit') ctx.problems.add(['time', 'solver'], 'the explicit scheme solves no linear systems; remove "solver" or use scheme: imex');
}

/**
 * The time step and linear solver. Explicit: refused above the stability limit
 * 2/(D·λmax) of this mesh, warned about above the positivity bound, by default
 * EXPLICIT_STEP_FRACTION of it. IMEX: the model's suggested step (own kinetics
 * must give one); `solver: auto` factorises when CG would need many iterations.
 * Default steps fit a whole number of times into the output interval. Warns when
 * the explicit reaction update is unstable at the steady state.
 */
export function resolveTime(ctx: ResolveContext, kin: KineticsPlan, system: ReactionDiffusionSystem, lin: Linearisation, uniformSteady: number[] | undefined): TimePlan {
  const { problems, warnings } = ctx;
  const sc = ctx.source.scenario;
  const model = kin.model;
  const mesh = system.mesh;
  const n = mesh.positions.length / 3;
  const scheme = sc.time.scheme ?? 'imex';
  const requested = sc.time.solver ?? 'auto';
  const stiffness = cotanStiffness(mesh);
  const mass = lumpedMass(mesh);
  const end = sc.time.end;
  let dt = sc.time.step;
  let explicitLimit: ExplicitStepLimit | undefined;
  /** a default step no larger than `largest` that fits a whole number of times into the output interval (or the end time) */
  const wholeSteps = (largest: number) => {
    const base = sc.output?.every ?? end / OUTPUTS_PER_RUN;
    return base / Math.ceil(base / largest - 1e-9);
  };
  if (scheme === 'explicit') {
    explicitLimit = systemExplicitLimit(system, stiffness, mass);
    if (dt === undefined) {
      dt = wholeSteps(Math.min(EXPLICIT_STEP_FRACTION * explicitLimit.safeUpTo, model?.suggestedStep ?? Infinity, end / 10));
    } else if (dt > explicitLimit.unstableAbove) {
      problems.add(['time', 'step'], `${dt} is above the explicit scheme's stability limit ${explicitLimit.unstableAbove.toPrecision(3)} on this mesh (2/(D·λmax)); use step ≤ ${explicitLimit.safeUpTo.toPrecision(3)}, or scheme: imex`);
    } else if (dt > explicitLimit.safeUpTo) {
      warnings.push(`time.step ${dt} exceeds the explicit scheme's positivity bound ${explicitLimit.safeUpTo.toPrecision(3)} on this mesh: values may oscillate or turn negative; ${explicitLimit.unstableAbove.toPrecision(3)} is certainly unstable`);
    }
  } else if (dt === undefined) {
    if (model?.suggestedStep === undefined) problems.add(['time'], 'missing "step": for your own kinetics give a time step (the implicit–explicit scheme is stable for any step in diffusion, but the reactions set the accuracy)');
    else dt = wholeSteps(Math.min(model.suggestedStep, end / 10));
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
  // the reactions are stepped explicitly in both schemes: forward Euler is stable at the steady
  // state only if |1 + dt·λ| ≤ 1 for every eigenvalue λ of its Jacobian
  if (uniformSteady || !model?.steadyStates) {
    const J = lin.jacobian();
    if (J) {
      const eigen = smallMatrixEigenvalues(J, kin.species.length);
      let limit = Infinity, worst = 0;
      for (const [re, im] of eigen) {
        worst = Math.max(worst, Math.hypot(1 + step * re, step * im));
        if (re < 0) limit = Math.min(limit, (-2 * re) / (re * re + im * im));
      }
      if (worst > 1 + 1e-12) {
        warnings.push(`time.step ${step} makes the explicit reaction update unstable at the steady state (|1 + dt·λ| = ${worst.toPrecision(4)} > 1): homogeneous oscillations will grow${Number.isFinite(limit) ? `; use time.step < ${limit.toPrecision(3)}` : ''}`);
      }
    }
  }
  return { scheme, dt: step, end, steps, solver, solverReason, tolerance: sc.time.tolerance ?? CG_TOLERANCE, explicitLimit, operators: { stiffness, mass } };
}
