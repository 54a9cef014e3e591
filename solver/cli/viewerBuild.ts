import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { PACKAGE_ROOT } from '../packageRoot.ts';

export const VIEWER_DIR = join(PACKAGE_ROOT, 'viewer');
export const VIEWER_DIST = join(VIEWER_DIR, 'dist');

/** Newest modification time of the files under the viewer's sources (viewer/, solver/, meshes/). */
function newestSource(): number {
  let newest = 0;
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      if (name === 'dist' || name === 'node_modules') continue;
      const p = join(dir, name);
      const s = statSync(p);
      if (s.isDirectory()) walk(p);
      else if (/\.(ts|html|css|yaml)$/.test(name)) newest = Math.max(newest, s.mtimeMs);
    }
  };
  for (const d of ['viewer', 'solver', 'meshes']) walk(join(PACKAGE_ROOT, d));
  return newest;
}

/**
 * Build the viewer (vite) into viewer/dist when it is missing or older than
 * its sources; returns the directory. A build takes a few seconds.
 */
export async function ensureViewerBuilt(log: (line: string) => void = () => {}, force = false): Promise<string> {
  const index = join(VIEWER_DIST, 'index.html');
  if (!force && existsSync(index) && statSync(index).mtimeMs >= newestSource()) return VIEWER_DIST;
  log('building the viewer (vite)…');
  const { build } = await import('vite');
  await build({
    configFile: false,
    root: VIEWER_DIR,
    base: './',
    logLevel: 'error',
    build: { outDir: VIEWER_DIST, emptyOutDir: true, chunkSizeWarningLimit: 6000, reportCompressedSize: false },
    worker: { format: 'es' },
  });
  return VIEWER_DIST;
}
