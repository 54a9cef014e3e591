import { readFileSync } from 'node:fs';

/** The package version, read once from package.json. */
export const VERSION: string = (() => {
  try {
    return JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')).version;
  } catch {
    return 'unknown';
  }
})();
