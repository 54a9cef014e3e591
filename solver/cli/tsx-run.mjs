#!/usr/bin/env node
// Runs a TypeScript file of the project (benchmarks, scripts) under the tsx loader.
import { register } from 'tsx/esm/api';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';

register();
const file = process.argv[2];
if (!file) {
  console.error('usage: node solver/cli/tsx-run.mjs FILE.ts [args...]');
  process.exit(2);
}
process.argv.splice(2, 1);
await import(pathToFileURL(resolve(file)).href);
