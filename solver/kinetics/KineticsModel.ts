/**
 * A reaction model: species, the rate of each as a formula, named parameters,
 * default diffusion, and (where closed-form) the homogeneous steady states.
 *
 * Rates are written in the same formula language users write their own
 * kinetics in (see `parseFormula`), so built-in and user models share one
 * compiler, one symbolic Jacobian and one set of kernels.
 */
export interface KineticsModel {
  /** identifier used in scenario files, e.g. `gray-scott` */
  readonly name: string;
  readonly title: string;
  /** one line on what it models, and the published form it follows */
  readonly description: string;
  readonly citation: string;
  readonly species: readonly string[];
  /** rate of each species, keyed by species name */
  readonly reactions: Readonly<Record<string, string>>;
  readonly parameters: Readonly<Record<string, { default: number; description: string }>>;
  /**
   * Diffusion coefficient of each species: a number, or a formula in the
   * parameters (Schnakenberg's `d`, for example).
   */
  readonly diffusion: Readonly<Record<string, number | string>>;
  /**
   * Homogeneous steady states for the given parameter values (each an array
   * in species order), or undefined where no closed form is implemented.
   */
  readonly steadyStates?: (p: Readonly<Record<string, number>>) => number[][];
  /** a sensible time step for the implicit–explicit scheme, in model time units */
  readonly suggestedStep?: number;
  /** the species painted by default (the one that shows the pattern best) */
  readonly display?: string;
}
