import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const root = join(__dirname, '..', '..');

/** The first ```ts block under a README heading. */
function readmeBlock(heading: string): string {
  const readme = readFileSync(join(root, 'README.md'), 'utf8');
  const at = readme.indexOf(`## ${heading}\n`);
  expect(at, `README has a "${heading}" section`).toBeGreaterThanOrEqual(0);
  const m = /```ts\n([\s\S]*?)```/.exec(readme.slice(at));
  expect(m, `README's "${heading}" section has a ts block`).not.toBeNull();
  return m![1];
}

/** Newest modification time of the sources the package build compiles. */
function newestSource(dir: string): number {
  let newest = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) newest = Math.max(newest, newestSource(p));
    else if (e.name.endsWith('.ts')) newest = Math.max(newest, statSync(p).mtimeMs);
  }
  return newest;
}

describe('Placode as a package (README: Use from TypeScript)', () => {
  it('the README example type-checks against the declarations and runs with plain Node, importing placode by its name', () => {
    const stamp = statSync(join(root, 'dist', '.build-stamp'), { throwIfNoEntry: false });
    expect(stamp && stamp.mtimeMs >= Math.max(newestSource(join(root, 'solver')), newestSource(join(root, 'meshes', 'shapes'))), 'dist/ is older than the sources: run npm run build (npm test does)').toBe(true);
    // inside the package directory, so that 'placode' resolves to the package itself through its exports
    mkdirSync(join(root, 'test', '.tmp'), { recursive: true });
    const dir = mkdtempSync(join(root, 'test', '.tmp', 'library-'));
    try {
      writeFileSync(join(dir, 'example.ts'), readmeBlock('Use from TypeScript'));
      writeFileSync(join(dir, 'tsconfig.json'), JSON.stringify({ compilerOptions: { module: 'NodeNext', moduleResolution: 'NodeNext', target: 'ES2022', strict: true, types: ['node'], skipLibCheck: false }, files: ['example.ts'] }));
      // the declarations are complete: the example compiles, library types checked too
      execFileSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(dir, 'tsconfig.json')], { encoding: 'utf8' });
      const out = execFileSync(process.execPath, [join(dir, 'example.js')], { encoding: 'utf8', cwd: dir });
      const lines = out.trim().split('\n');
      expect(lines[0]).toMatch(/^limb bud: \d+ vertices, area \d/);
      const eigenvalues = lines[1].replace('eigenvalues: ', '').split(' ').map(Number);
      expect(eigenvalues.length).toBe(20);
      // the constant mode: K·1 = 0 exactly, so λ0 = 0 to the printed digits; the rest positive and sorted
      expect(eigenvalues[0]).toBe(0);
      for (let k = 1; k < 20; k++) expect(eigenvalues[k]).toBeGreaterThanOrEqual(eigenvalues[k - 1]);
      expect(eigenvalues[1]).toBeGreaterThan(0);
      expect(lines[3]).toMatch(/^after 100 steps \(t = 0\.020\): u in \[/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});
