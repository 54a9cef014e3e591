import type { FieldValue } from './Scenario.ts';
import type { ResolveContext } from './Problems.ts';
import { closestName } from './ScenarioError.ts';
import { MODELS } from '../kinetics/models/index.ts';
import type { KineticsModel } from '../kinetics/KineticsModel.ts';
import { compileKinetics, KineticsError, type CompiledKinetics } from '../kinetics/compileKinetics.ts';
import { missingDiffusion } from './resolveFields.ts';
import { ownKineticsStart } from './resolveInitial.ts';
import { OWN_KINETICS_STEP } from './resolveTime.ts';

/** The `kinetics` section resolved: a built-in model or the user's own species and reactions, compiled. */
export interface KineticsPlan {
  model?: KineticsModel;
  species: string[];
  reactions: Record<string, string>;
  /** every parameter (the model's defaults overridden by the scenario), in the kinetics' order */
  parameterSpec: Record<string, FieldValue>;
  /** undefined when the section has problems */
  kinetics?: CompiledKinetics;
}

/**
 * The kinetics section: a built-in model with its parameters checked against
 * the model's, or the user's own species and reaction formulas; compiled when
 * nothing is wrong (formula problems are reported under their keys).
 */
export function resolveKinetics(ctx: ResolveContext): KineticsPlan {
  const k = ctx.source.scenario.kinetics;
  const { problems } = ctx;
  const plan: KineticsPlan = { species: [], reactions: {}, parameterSpec: {} };
  if (k.model !== undefined) {
    const model = Object.hasOwn(MODELS, k.model) ? MODELS[k.model] : undefined;
    if (!model) {
      const hint = closestName(k.model, Object.keys(MODELS));
      problems.add(['kinetics', 'model'], `unknown model "${k.model}"${hint ? ` (did you mean "${hint}"?)` : ''}; built-in models: ${Object.keys(MODELS).join(', ')}, or give species and reactions for your own`);
    } else {
      plan.model = model;
      if (k.species || k.reactions) problems.add(['kinetics', k.species ? 'species' : 'reactions'], `give either a built-in model or your own species and reactions, not both`);
      plan.species = [...model.species];
      plan.reactions = { ...model.reactions };
      for (const [name, p] of Object.entries(model.parameters)) plan.parameterSpec[name] = p.default;
      const given = new Map<string, string>(); // ASCII name → the name the scenario used
      for (const [written, v] of Object.entries(k.parameters ?? {})) {
        // the model table's Greek names (γ, κ, ε, a₀ …) are the same parameters as their ASCII names
        const ascii = asciiParameterName(written);
        const name = !Object.hasOwn(model.parameters, written) && Object.hasOwn(model.parameters, ascii) ? ascii : written;
        if (given.has(name)) {
          problems.add(['kinetics', 'parameters', written], `"${written}" and "${given.get(name)}" are the same parameter, given twice; keep one`);
          continue;
        }
        given.set(name, written);
        if (!Object.hasOwn(model.parameters, name)) {
          const hint = closestName(name, Object.keys(model.parameters));
          problems.add(['kinetics', 'parameters', name], `${model.title} has no parameter "${name}"${hint ? ` (did you mean "${hint}"?)` : ''}; its parameters: ${Object.keys(model.parameters).join(', ')}`);
        } else plan.parameterSpec[name] = v;
      }
    }
  } else {
    if (!k.species) problems.add(['kinetics'], 'name a built-in model (model: gray-scott, …) or list your own species and reactions');
    else if (!k.reactions) problems.add(['kinetics'], 'missing "reactions": a rate formula for each species');
    plan.species = k.species ?? [];
    plan.reactions = k.reactions ?? {};
    for (const name of Object.keys(k.parameters ?? {})) {
      if (asciiParameterName(name) !== name) problems.add(['kinetics', 'parameters', name], `your own kinetics' names are ASCII (a letter, then letters, digits or _): write "${asciiParameterName(name)}" here and in the formulas`);
    }
    Object.assign(plan.parameterSpec, k.parameters ?? {});
  }
  if (plan.species.length && !problems.any) {
    try {
      plan.kinetics = compileKinetics(plan.species, plan.reactions, Object.keys(plan.parameterSpec));
    } catch (e) {
      if (!(e instanceof KineticsError)) throw e;
      for (const p of e.problems) {
        const [kind, name] = p.key.split('.');
        const path = kind === 'reactions' ? ['kinetics', 'reactions', name] : kind === 'parameters' ? ['kinetics', 'parameters', name] : ['kinetics', 'species'];
        problems.add(path, p.message);
      }
    }
  }
  if (k.model === undefined && plan.species.length) {
    // what your own kinetics needs that a model would supply, named at once with its formulas' problems
    const sc = ctx.source.scenario;
    for (const s of plan.species) if (sc.diffusion?.[s] === undefined) problems.add(['diffusion'], missingDiffusion(s));
    const values = sc.initial?.values ?? 'steady';
    if (values === 'steady' || Object.values(values).includes('steady')) problems.add(['initial', 'values'], ownKineticsStart(plan.species));
    if ((sc.time?.scheme ?? 'imex') === 'imex' && sc.time?.step === undefined) problems.add(['time'], OWN_KINETICS_STEP);
  }
  return plan;
}

const GREEK: Readonly<Record<string, string>> = { 'α': 'alpha', 'β': 'beta', 'γ': 'gamma', 'δ': 'delta', 'ε': 'epsilon', 'κ': 'kappa', 'σ': 'sigma' };

/** A parameter name as the scenario's ASCII names spell it: Greek letters by name, subscript digits as digits (γ → gamma, a₀ → a0, r₁ → r1). */
export function asciiParameterName(name: string): string {
  return [...name].map((c) => GREEK[c] ?? (c >= '₀' && c <= '₉' ? String(c.charCodeAt(0) - 0x2080) : c)).join('');
}
