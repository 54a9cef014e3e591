import { Option } from 'commander';
import type { RegisterCommand } from './CommandContext.ts';
import { parseCount, PROGRESS_CHOICES, type ProgressChoice } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { DEFAULT_COLORMAP, DEFAULT_VIEW, SHEET_THUMBNAIL } from '../../defaults.ts';
import { VIEW_PRESETS } from '../../io/surfaceView.ts';

type SlurmCommandOptions = { partition?: string; time?: string; mem?: string; maxParallel?: string; all?: boolean; retryFailed?: boolean; launcher?: string; maxArraySize?: string; submit?: boolean };
type CollectCommandOptions = { csv?: string; sheet?: string | boolean; species?: string; colormap: string; range?: string; view: string; thumbnail: string };

export const registerSweep: RegisterCommand = (program, ctx) => {
  const sweep = program
    .command('sweep')
    .description('parameter sweeps: plan a manifest of runs, run it on every core or as a Slurm job array, follow it, collect the results');
  sweep
    .command('plan')
    .argument('<sweep>', 'a sweep file (scenario: + vary:) or a scenario with a sweep: section')
    .description('expand a sweep into DIR/manifest.jsonl (one run per line) and a scenario per run')
    .requiredOption('-o, --out <dir>', 'sweep directory')
    .option('--force', 'plan again into a directory that holds a sweep (finished runs with unchanged scenarios are kept)')
    .action(async (file: string, o: { out: string; force?: boolean }) => {
      const { planSweep } = await import('../../sweep/sweepPlan.ts');
      const { entries, plan } = planSweep(file, o);
      process.stdout.write(`planned ${entries.length} runs (${plan.design}${plan.duplicatesDropped ? `, ${plan.duplicatesDropped} duplicate points dropped` : ''}) in ${o.out}\n`);
      process.stdout.write(`  run them here:      placode sweep run ${o.out}\n  or on Slurm:        placode sweep slurm ${o.out} --submit\n`);
    });
  sweep
    .command('run')
    .argument('<dir>', 'a planned sweep directory')
    .description('run every unfinished run of a sweep on a pool of worker threads; finished runs are skipped')
    .option('-w, --workers <n>', 'worker threads (default: every core)')
    .option('--retry-failed', 'run failed runs again')
    .addOption(new Option('--progress <mode>', 'progress display').choices(PROGRESS_CHOICES).default('auto'))
    .action(async (dir: string, o: { workers?: string; retryFailed?: boolean; progress: ProgressChoice }) => {
      const workers = parseCount(o.workers, '--workers', 1);
      const { runSweepLocal } = await import('../../sweep/sweepPool.ts');
      const r = await runSweepLocal(dir, { workers, retryFailed: o.retryFailed, progress: o.progress });
      process.stdout.write(`${r.done} done, ${r.failed.length} failed, ${r.skipped} already finished, ${r.unfinished} unfinished of ${r.total} runs in ${r.seconds.toFixed(1)} s on ${r.workers} worker(s)\n`);
      for (const f of r.failed) process.stdout.write(`  failed: run ${f.index} (${f.id}): ${indented(f.message)}\n`);
      if (r.failedBefore) process.stdout.write(`${r.failedBefore} run(s) failed in an earlier call and were not run again: placode sweep status ${dir} --list failed shows why; --retry-failed runs them again\n`);
      if (r.interrupted) {
        process.stdout.write(`interrupted; continue with: placode sweep run ${dir}\n`);
        ctx.setExitCode(130);
      } else if (r.failed.length || r.failedBefore) ctx.setExitCode(1);
    });
  sweep
    .command('task')
    .argument('<dir>', 'a planned sweep directory')
    .description('run one entry of a sweep (what each Slurm array task runs)')
    .requiredOption('--index <i>', 'manifest index (the Slurm array task id)')
    .option('--retry-failed', 'run it again if it failed before')
    .action(async (dir: string, o: { index: string; retryFailed?: boolean }) => {
      const index = parseCount(o.index, '--index')!;
      const { runSweepTask } = await import('../../sweep/sweepTask.ts');
      let stop = false;
      const onSignal = () => { stop = true; };
      process.on('SIGTERM', onSignal);
      try {
        const r = await runSweepTask(dir, index, { retryFailed: o.retryFailed, log: (s) => process.stderr.write(s + '\n'), shouldStop: () => stop });
        process.stdout.write(`run ${r.index} (${r.id}): ${r.skipped ? `already ${r.state}` : r.state}: ${indented(r.message)}\n`);
        ctx.setExitCode(r.state === 'done' ? 0 : r.state === 'failed' ? 1 : 130);
      } finally {
        process.off('SIGTERM', onSignal);
      }
    });
  sweep
    .command('status')
    .argument('<dir>', 'a planned sweep directory')
    .description('how many runs are done, failed, running, interrupted and pending (read from the run directories)')
    .option('--json', 'every run with its state, as JSON')
    .option('--list <state>', 'list the runs in one state')
    .action(async (dir: string, o: { json?: boolean; list?: string }) => {
      const { sweepStatus } = await import('../../sweep/sweepTask.ts');
      const s = sweepStatus(dir);
      if (o.json) {
        process.stdout.write(JSON.stringify({ counts: s.counts, runs: s.runs.map((r) => ({ index: r.index, id: r.id, label: r.label, state: r.state, message: r.message })) }, null, 2) + '\n');
        return;
      }
      const total = s.runs.length;
      process.stdout.write(`${dir}: ${total} runs — ${Object.entries(s.counts).map(([k, v]) => `${v} ${k}`).join(', ')}\n`);
      if (o.list) {
        if (!Object.hasOwn(s.counts, o.list)) throw new UsageError(`--list ${o.list}: one of ${Object.keys(s.counts).join(', ')}`);
        for (const r of s.runs) if (r.state === o.list) process.stdout.write(`  ${String(r.index).padStart(5)}  ${r.id}  ${r.label}${r.message ? `  — ${indented(r.message)}` : ''}\n`);
      } else {
        for (const r of s.runs) if (r.state === 'failed') process.stdout.write(`  failed ${r.index} (${r.label}): ${indented(r.message ?? '')}\n`);
      }
    });
  sweep
    .command('slurm')
    .argument('<dir>', 'a planned sweep directory')
    .description('write a Slurm job array (one task per unfinished run) to DIR/slurm/array.sbatch, and submit it with --submit')
    .option('--partition <p>', 'Slurm partition')
    .option('--time <t>', 'wall time per run (minutes, HH:MM:SS or D-HH:MM:SS)')
    .option('--mem <m>', 'memory per run (e.g. 2G)')
    .option('--max-parallel <k>', 'most runs at once')
    .option('--all', 'every run, finished or not')
    .option('--retry-failed', 'include failed runs and run them again')
    .option('--launcher <command>', 'how compute nodes start placode (default: this node and placode by absolute path)')
    .option('--max-array-size <n>', "the cluster's MaxArraySize (default: from scontrol, else 1001); larger sweeps get several arrays")
    .option('--submit', 'submit with sbatch')
    .action(async (dir: string, o: SlurmCommandOptions) => {
      const counts = { maxParallel: parseCount(o.maxParallel, '--max-parallel', 1), maxArraySize: parseCount(o.maxArraySize, '--max-array-size', 1) };
      const { writeSlurmArray } = await import('../../sweep/sweepSlurm.ts');
      const r = writeSlurmArray(dir, { ...o, ...counts });
      process.stdout.write(`wrote ${r.scripts.join(', ')} (${r.indices.length} array tasks)\n`);
      if (r.jobIds.length) process.stdout.write(`submitted job${r.jobIds.length > 1 ? 's' : ''} ${r.jobIds.join(', ')}; follow with: placode sweep status ${dir}\n`);
      else process.stdout.write(`submit with: ${r.scripts.map((f) => `sbatch ${f}`).join(' && ')}\n`);
    });
  sweep
    .command('collect')
    .argument('<dir>', 'a planned sweep directory')
    .description('gather every run\'s final metrics and stability summary into one CSV, and a contact sheet of the patterns on the parameter grid')
    .option('--csv <file>', 'CSV file (default DIR/sweep.csv)')
    .option('--sheet <file>', 'contact sheet PNG (default DIR/sheet.png)')
    .option('--no-sheet', 'no contact sheet')
    .option('--species <name>', 'species painted on the sheet (default: the analysed one)')
    .option('--colormap <name>', 'colormap', DEFAULT_COLORMAP)
    .option('--range <r>', 'colour range min:max (default: over every run shown)')
    .option('--view <v>', `view preset (${Object.keys(VIEW_PRESETS).join(', ')})`, DEFAULT_VIEW)
    .option('--thumbnail <px>', 'width of each thumbnail', String(SHEET_THUMBNAIL))
    .action(async (dir: string, o: CollectCommandOptions) => {
      const thumbnail = parseCount(o.thumbnail, '--thumbnail', 40);
      const { collectSweep } = await import('../../sweep/sweepCollect.ts');
      const r = collectSweep(dir, { ...o, sheet: o.sheet === true ? undefined : o.sheet, thumbnail });
      process.stdout.write(`wrote ${r.csv} (${r.rows} runs${r.missing ? `, ${r.missing} not finished` : ''})\n`);
      if (r.sheet) process.stdout.write(`wrote ${r.sheet}\n`);
    });
};

/** A message of several lines, its later lines indented under the first. */
function indented(message: string): string {
  return message.trimEnd().split('\n').join('\n      ');
}
