import { Option } from 'commander';
import type { RegisterCommand } from './CommandContext.ts';
import { PROGRESS_CHOICES, parseCount, type ProgressChoice } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { MAX_THREADS } from '../../defaults.ts';

export const registerRun: RegisterCommand = (program, ctx) => {
  program
    .command('run')
    .argument('[scenario]', 'scenario file (.yaml, .yml or .json)')
    .description('run a scenario headless and write its outputs into a run directory')
    .option('-o, --out <dir>', 'run directory to write (record.json, frames/, final.ply, metrics.csv, state.bin)')
    .option('--resume <dir>', 'continue an interrupted run from its saved state')
    .option('--force', 'replace an existing run directory')
    .option('--check', 'check the scenario and print the resolved plan without running')
    .option('--yes', 'run even if the first steps show it will take more than a day')
    .option('--threads <n>', "threads to step with, over the scenario's time.threads (default: the machine's cores; small meshes use fewer; results are the same for any number)")
    .addOption(new Option('--progress <mode>', 'progress display').choices(PROGRESS_CHOICES).default('auto'))
    .action(async (file: string | undefined, o: { out?: string; resume?: string; force?: boolean; check?: boolean; yes?: boolean; threads?: string; progress: ProgressChoice }) => {
      const threads = parseCount(o.threads, '--threads', 1, MAX_THREADS);
      if (o.resume && (file || o.out)) throw new UsageError('--resume DIR continues a run as it was set up: give no scenario or --out with it');
      if (!o.resume && !file) throw new UsageError('give a scenario file (placode run scenario.yaml --out DIR) or --resume DIR');
      const { runScenarioFile, resumeRun, checkScenario } = await import('../../run/runScenarioFile.ts');
      if (o.check && !o.resume) {
        process.stdout.write(JSON.stringify(checkScenario(file!), null, 2) + '\n');
        return;
      }
      const outcome = o.resume
        ? await resumeRun(o.resume, { progress: o.progress, yes: o.yes, threads, command: ctx.argv })
        : await runScenarioFile(file!, { out: o.out, force: o.force, progress: o.progress, yes: o.yes, threads, command: ctx.argv });
      ctx.setExitCode(outcome.reason === 'blow-up' || outcome.reason === 'degenerate' ? 3 : outcome.reason === 'interrupted' ? 130 : outcome.reason === 'failed' ? 1 : 0);
    });
};
