import type { Command } from 'commander';

/**
 * What a command's registration gets besides the program: the exit code to
 * set and the command line as typed (for run records). Each command lives in
 * its own file and loads the modules it needs only when it runs, so
 * `placode --version` and `placode --help` start at once.
 */
export interface CommandContext {
  setExitCode(code: number): void;
  argv: string[];
}

export type RegisterCommand = (program: Command, ctx: CommandContext) => void;

/** A line on stderr unless quiet. */
export function note(quiet: boolean | undefined, text: string): void {
  if (!quiet) process.stderr.write(text + '\n');
}
