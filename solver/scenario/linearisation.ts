import type { CompiledKinetics } from '../kinetics/compileKinetics.ts';
import type { KineticsPlan } from './resolveKinetics.ts';
import type { FieldPlan } from './resolveFields.ts';
import { numericalSteadyStates } from '../analysis/steadyStates.ts';
import { turingAnalysis } from '../analysis/dispersion.ts';

/**
 * The kinetics linearised at the scenario's steady state, for the checks a
 * resolver makes before any run (the reaction step's stability, the pattern
 * wavelength refinement follows). Fields enter as 0 unless a constant of the
 * same name shadows them; the state is the closed-form one chosen, else
 * Newton's, found once on first use.
 */
export class Linearisation {
  readonly constantParams: number[];
  private memo: number[] | undefined | null = null;

  constructor(readonly kinetics: CompiledKinetics, kin: KineticsPlan, fields: FieldPlan, private readonly uniformSteady: number[] | undefined, private readonly seed: number, private readonly steadyIndex: number) {
    this.constantParams = Object.keys(kin.parameterSpec).map((name, j) => (typeof fields.parameters[j] === 'number' ? (fields.parameters[j] as number) : fields.constants[name] ?? 0));
  }

  /** The steady state, or undefined when there is none with this index. */
  state(): number[] | undefined {
    if (this.memo === null) this.memo = this.uniformSteady ?? numericalSteadyStates(this.kinetics, this.constantParams, this.seed)[this.steadyIndex];
    return this.memo;
  }

  /** Row-major Jacobian at the steady state, or undefined without one. */
  jacobian(): number[] | undefined {
    const s = this.state();
    return s ? Array.from(this.kinetics.jacobian(s, this.constantParams)) : undefined;
  }

  /** The fastest-growing k² of a Turing instability with these (mean) diffusion coefficients, or null. */
  fastest(diffusion: readonly (number | Float64Array)[]): { k2: number; rate: number } | null {
    const J = this.jacobian();
    if (!J) return null;
    const d = diffusion.map((x) => (typeof x === 'number' ? x : x.reduce((a, b) => a + b, 0) / x.length));
    return turingAnalysis(J, d).fastest;
  }
}
