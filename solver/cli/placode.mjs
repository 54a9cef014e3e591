#!/usr/bin/env node
// The `placode` command. Runs the compiled command line in dist/ (built at install by
// `npm run build`, the package's `prepare`); in a checkout whose TypeScript sources are
// newer than that build (a developer's edits), runs the sources through tsx instead.
import { existsSync, readdirSync, statSync } from 'node:fs';

// `placode models | head` closes the pipe early: that is not an error
process.stdout.on('error', (e) => {
  if (e.code === 'EPIPE') process.exit(0);
  throw e;
});

const root = new URL('../../', import.meta.url);
const stamp = new URL('dist/.build-stamp', root);

/** Newest modification time of the TypeScript the build compiles. */
function newestSource() {
  let newest = 0;
  const walk = (dir) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      if (entry.isDirectory()) walk(new URL(`${entry.name}/`, dir));
      else if (entry.name.endsWith('.ts')) newest = Math.max(newest, statSync(new URL(entry.name, dir)).mtimeMs);
    }
  };
  walk(new URL('solver/', root));
  walk(new URL('meshes/shapes/', root));
  return newest;
}

let entry = new URL('dist/solver/cli/main.js', root);
if (!existsSync(stamp) || statSync(stamp).mtimeMs < newestSource()) {
  let register;
  try {
    ({ register } = await import('tsx/esm/api'));
  } catch {
    register = undefined;
  }
  if (register) {
    register();
    entry = new URL('solver/cli/main.ts', root);
    if (process.stderr.isTTY) process.stderr.write('placode: running the TypeScript sources (newer than dist/; `npm run build` makes start-up fast again)\n');
  } else if (!existsSync(entry)) {
    process.stderr.write('placode: the compiled command line is missing: run `npm run build` (or `npm ci`) in the Placode directory\n');
    process.exit(1);
  }
}
const { main } = await import(entry.href);
process.exitCode = await main(process.argv.slice(2));
