#!/usr/bin/env node
// Command-line entry: registers the TypeScript loader, then runs the CLI.
import { register } from 'tsx/esm/api';

// `placode models | head` closes the pipe early: that is not an error
process.stdout.on('error', (e) => {
  if (e.code === 'EPIPE') process.exit(0);
  throw e;
});
register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2));
