import type { KineticsModel } from '../KineticsModel.ts';
import { grayScott } from './grayScott.ts';
import { schnakenberg } from './schnakenberg.ts';
import { giererMeinhardt } from './giererMeinhardt.ts';
import { brusselator } from './brusselator.ts';
import { fitzHughNagumo } from './fitzHughNagumo.ts';
import { barrioVareaAragon } from './barrioVareaAragon.ts';
import { lengyelEpstein } from './lengyelEpstein.ts';

/** The built-in kinetics, by scenario name. */
export const MODELS: Readonly<Record<string, KineticsModel>> = Object.fromEntries(
  [grayScott, schnakenberg, giererMeinhardt, brusselator, fitzHughNagumo, barrioVareaAragon, lengyelEpstein].map((m) => [m.name, m]),
);
