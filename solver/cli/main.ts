import { Command, CommanderError } from 'commander';
import { UsageError } from '../UsageError.ts';
import { VERSION } from '../version.ts';
import type { CommandContext, RegisterCommand } from './commands/CommandContext.ts';
import { registerShapes } from './commands/shapes.ts';
import { registerMesh } from './commands/mesh.ts';
import { registerModes } from './commands/modes.ts';
import { registerDemo } from './commands/demo.ts';
import { registerModels } from './commands/models.ts';
import { registerStability } from './commands/stability.ts';
import { registerExport } from './commands/export.ts';
import { registerFigure } from './commands/figure.ts';
import { registerRun } from './commands/run.ts';
import { registerView } from './commands/view.ts';
import { registerSweep } from './commands/sweep.ts';
import { registerStages } from './commands/stages.ts';

/** Every command, in the order `placode --help` lists them. */
const COMMANDS: RegisterCommand[] = [registerShapes, registerMesh, registerStages, registerModes, registerDemo, registerModels, registerStability, registerExport, registerFigure, registerRun, registerView, registerSweep];

/**
 * Run the command line; returns the exit code. Never throws: an error is one
 * line on stderr (a stack trace with PLACODE_DEBUG=1) and exit code 1 (bad
 * data) or 2 (bad usage).
 */
export async function main(argv: string[]): Promise<number> {
  const program = new Command('placode')
    .description('Turing-type reaction–diffusion on tissue-shaped surfaces, fixed or growing: meshes, surface finite elements, eigenmodes, stability, runs')
    .version(VERSION)
    .exitOverride()
    .configureOutput({ writeErr: (s) => process.stderr.write(s) })
    .showHelpAfterError('(run with --help for usage)');
  let exitCode = 0;
  const ctx: CommandContext = { setExitCode: (code) => { exitCode = code; }, argv };
  for (const register of COMMANDS) register(program, ctx);
  try {
    await program.parseAsync(argv, { from: 'user' });
    return exitCode;
  } catch (e) {
    if (e instanceof CommanderError) {
      return e.exitCode === 0 || e.code === 'commander.helpDisplayed' || e.code === 'commander.version' ? 0 : 2;
    }
    const err = e as Error;
    const cmd = argv.find((a) => !a.startsWith('-')) ?? '';
    process.stderr.write(`placode${cmd ? ' ' + cmd : ''}: ${err.message}\n`);
    if (process.env.PLACODE_DEBUG) process.stderr.write(`${err.stack}\n`);
    return e instanceof UsageError ? 2 : 1;
  }
}
