import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The directory holding Placode's package.json (and meshes/, viewer/): found
 * by walking up from this file, so it is the same whether the code runs from
 * its TypeScript sources (solver/) or compiled (dist/solver/). Node only.
 */
export const PACKAGE_ROOT: string = (() => {
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json'))) {
    const up = dirname(dir);
    if (up === dir) throw new Error(`no package.json above ${fileURLToPath(import.meta.url)}: is Placode installed whole?`);
    dir = up;
  }
  return dir;
})();

/** A file of the package, by its path from the package root (`meshes/examples/…`). */
export function packageFile(path: string): string {
  return join(PACKAGE_ROOT, path);
}
