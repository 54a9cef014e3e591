import type { RegisterCommand } from './CommandContext.ts';
import { parseCount } from '../options.ts';
import { DEFAULT_COLORMAP, DEFAULT_VIEW, FIGURE_SIZE } from '../../defaults.ts';
import { VIEW_PRESETS } from '../../io/surfaceView.ts';

type FigureCommandOptions = { out: string; frame?: string; sheet?: boolean; species?: string; colormap: string; range?: string; view: string; title?: string; width: string; height: string; dpi: string; force?: boolean };

export const registerFigure: RegisterCommand = (program) => {
  program
    .command('figure')
    .argument('<input>', 'a run directory or one frame file (.ply)')
    .description('render the coloured surface as a PNG or SVG figure with a colour bar (no GPU)')
    .requiredOption('-o, --out <file>', 'figure file, .png or .svg')
    .option('--frame <n>', 'frame index of a run (default: the final state)')
    .option('--sheet', 'every frame of the run in a grid, captioned with its time')
    .option('--species <name>', 'species to paint (default: the last one)')
    .option('--colormap <name>', 'colormap', DEFAULT_COLORMAP)
    .option('--range <r>', 'colour range: min:max, or run (over every frame of the run); default: over the frames shown')
    .option('--view <v>', `view preset (${Object.keys(VIEW_PRESETS).join(', ')}) or azimuth,elevation`, DEFAULT_VIEW)
    .option('--title <text>', 'title above the figure')
    .option('--width <px>', 'width in pixels', String(FIGURE_SIZE.width))
    .option('--height <px>', 'height in pixels', String(FIGURE_SIZE.height))
    .option('--dpi <n>', 'resolution recorded in a PNG', String(FIGURE_SIZE.dpi))
    .option('--force', 'overwrite an existing file')
    .action(async (input: string, o: FigureCommandOptions) => {
      const sizes = { frame: parseCount(o.frame, '--frame'), width: parseCount(o.width, '--width', 1)!, height: parseCount(o.height, '--height', 1)!, dpi: parseCount(o.dpi, '--dpi', 1)! };
      const { runFigure } = await import('../figure.ts');
      process.stdout.write(`wrote ${runFigure(input, { ...o, ...sizes })}\n`);
    });
};
