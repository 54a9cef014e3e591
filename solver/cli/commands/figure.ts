import type { RegisterCommand } from './CommandContext.ts';
import { parseCount } from '../options.ts';
import { DEFAULT_COLORMAP, DEFAULT_VIEW, FIGURE_SIZE } from '../../defaults.ts';
import { VIEW_PRESETS } from '../../io/surfaceView.ts';

type FigureCommandOptions = { out: string; frame?: string; sheet?: boolean; species?: string; field?: string; colormap?: string; range?: string; view: string; title?: string; width: string; height: string; dpi: string; shading: string; vector?: boolean; force?: boolean };

export const registerFigure: RegisterCommand = (program) => {
  program
    .command('figure')
    .argument('<input>', 'a run directory, a frame file, or any PLY with scalar vertex values (a painted mode)')
    .description('render the coloured surface as a PNG or SVG figure with a colour bar (no GPU), painted as the run painted it')
    .requiredOption('-o, --out <file>', 'figure file, .png or .svg')
    .option('--frame <n>', 'frame index of a run (default: the final state)')
    .option('--sheet', 'every frame of the run in a grid, captioned with its time')
    .option('--species <name>', "species to paint (default: the run's output.colour, else the last one)")
    .option('--field <name>', 'any scalar vertex property of the PLY instead (mode, species_u, your own)')
    .option('--colormap <name>', `colormap (default: the run's output.colormap; diverging for a mode; else ${DEFAULT_COLORMAP})`)
    .option('--range <r>', "colour range: min:max, or run (over every frame of the run); default: the run's fixed output.range, symmetric for a mode, else over the frames shown")
    .option('--view <v>', `view preset (${Object.keys(VIEW_PRESETS).join(', ')}) or azimuth,elevation`, DEFAULT_VIEW)
    .option('--title <text>', 'title above the figure')
    .option('--width <px>', 'width in pixels', String(FIGURE_SIZE.width))
    .option('--height <px>', 'height in pixels', String(FIGURE_SIZE.height))
    .option('--dpi <n>', 'resolution: text is sized in points, so it sets the type size in pixels; recorded in a PNG', String(FIGURE_SIZE.dpi))
    .option('--shading <s>', 'none (colours exactly as on the bar), soft (within 15 % of them) or headlight', 'soft')
    .option('--vector', 'SVG: draw the surface as triangles (large files) instead of an embedded image under vector text')
    .option('--force', 'overwrite an existing file')
    .action(async (input: string, o: FigureCommandOptions) => {
      const sizes = { frame: parseCount(o.frame, '--frame'), width: parseCount(o.width, '--width', 1)!, height: parseCount(o.height, '--height', 1)!, dpi: parseCount(o.dpi, '--dpi', 1)! };
      const { runFigure } = await import('../figure.ts');
      process.stdout.write(`wrote ${runFigure(input, { ...o, ...sizes })}\n`);
    });
};
