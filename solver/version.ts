import { readFileSync } from 'node:fs';
import { packageFile } from './packageRoot.ts';

/** The package version, read once from package.json. */
export const VERSION: string = (() => {
  try {
    return JSON.parse(readFileSync(packageFile('package.json'), 'utf8')).version;
  } catch {
    return 'unknown';
  }
})();
