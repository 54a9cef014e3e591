import { Option } from 'commander';
import type { RegisterCommand } from './CommandContext.ts';
import { parseCount } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { ANIMATION_SECONDS, COLORMAP_CHOICES, DEFAULT_COLORMAP, SNAPSHOT_FORMAT_CHOICES } from '../../defaults.ts';

type ExportCommandOptions = { format: (typeof SNAPSHOT_FORMAT_CHOICES)[number]; out: string; frame?: string; all?: boolean; species?: string; colormap?: string; range?: string; ascii?: boolean; animate?: boolean; duration: string; force?: boolean };

export const registerExport: RegisterCommand = (program) => {
  program
    .command('export')
    .argument('<input>', 'a run directory or one frame file (.ply)')
    .description('export frames as PLY, binary glTF, OBJ with vertex colours, or CSV')
    .addOption(new Option('--format <f>', 'output format').choices([...SNAPSHOT_FORMAT_CHOICES]).default('ply'))
    .requiredOption('-o, --out <path>', 'output file (one frame) or directory (with --all)')
    .option('--frame <n>', 'frame index of a run (default: the final state)')
    .option('--all', 'every frame of the run (and final), into the --out directory')
    .option('--species <name>', "species painted as colours (default: the run's output.colour, else the last one)")
    .option('--colormap <name>', `colormap (${COLORMAP_CHOICES.join(' ')}; default: the run's output.colormap, else ${DEFAULT_COLORMAP})`)
    .option('--range <r>', "colour range: frame, run, or min:max (default: the run's fixed output.range, else frame)")
    .option('--ascii', 'ASCII PLY instead of binary')
    .option('--animate', 'glb: one file whose animation plays every frame (growth and colours)')
    .option('--duration <s>', 'seconds of playback for --animate', String(ANIMATION_SECONDS))
    .option('--force', 'overwrite existing files')
    .action(async (input: string, o: ExportCommandOptions) => {
      const duration = Number(o.duration);
      if (!(duration > 0)) throw new UsageError(`--duration must be a positive number of seconds, got "${o.duration}"`);
      const frame = parseCount(o.frame, '--frame');
      const { exportRun } = await import('../exportRun.ts');
      const files = await exportRun(input, { ...o, frame, duration });
      for (const f of files) process.stdout.write(`wrote ${f}\n`);
    });
};
