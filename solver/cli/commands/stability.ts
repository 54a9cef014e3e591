import type { RegisterCommand } from './CommandContext.ts';
import { collect, parseCount } from '../options.ts';
import { STABILITY_MAX_MODES } from '../../defaults.ts';

export const registerStability: RegisterCommand = (program) => {
  program
    .command('stability')
    .argument('<scenario>', 'scenario file whose kinetics, parameters, diffusion and mesh are analysed')
    .description('linear stability: steady states, Turing conditions, unstable band, and the surface modes it predicts')
    .option('--json', 'print the analysis as JSON')
    .option('--paint <file>', 'write the predicted mode as a painted PLY file')
    .option('--max-modes <n>', 'most surface eigenpairs to compute', String(STABILITY_MAX_MODES))
    .option('--state <i>', 'which homogeneous steady state to analyse (default: the scenario\'s initial.steadyState, else 0)')
    .option('--map <name=from:to:steps>', 'a parameter axis of a stability map (give two)', collect)
    .option('--map-out <prefix>', 'write the map as PREFIX.csv and PREFIX.svg')
    .option('--plot <file>', 'draw the dispersion relation, its band and the surface eigenvalues on it (.svg or .png)')
    .option('--plot-x <axis>', 'k² or wavelength axis of the plots: k2 or wavelength', 'k2')
    .option('--growth-plot <file>', 'a growing scenario: when each surface eigenvalue enters and leaves the band, as a figure (.svg or .png)')
    .option('--samples <n>', 'growing scenario that is not a similarity: surfaces sampled through growth', '12')
    .option('--dpi <n>', 'resolution of the plot (text is sized in points)', '150')
    .option('--force', 'overwrite existing output files')
    .action(async (file: string, o: { json?: boolean; paint?: string; maxModes: string; state?: string; map?: string[]; mapOut?: string; plot?: string; plotX: string; growthPlot?: string; samples: string; dpi: string; force?: boolean }) => {
      const maxModes = parseCount(o.maxModes, '--max-modes', 2);
      const state = parseCount(o.state, '--state');
      const dpi = parseCount(o.dpi, '--dpi', 36);
      const samples = parseCount(o.samples, '--samples', 2);
      const { runStability } = await import('../stability.ts');
      runStability(file, { json: o.json, paint: o.paint, map: o.map, mapOut: o.mapOut, plot: o.plot, plotX: o.plotX as 'k2' | 'wavelength', growthPlot: o.growthPlot, samples, progress: o.json ? undefined : (line) => process.stderr.write(line + '\n'), dpi, force: o.force, maxModes, state }, (s) => process.stdout.write(s));
    });
};
