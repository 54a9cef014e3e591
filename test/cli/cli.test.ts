import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as run } from '../fixtures/cli.ts';
import { parseMeshFile } from '../../solver/io/parseMeshFile.ts';


let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'placode-cli-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('placode mesh', () => {
  it('prints the documented JSON statistics for a shape', async () => {
    const r = await run('mesh', 'sphere', '--vertices', '642', '--json');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.out);
    expect(Object.keys(s)).toEqual(expect.arrayContaining(['vertices', 'triangles', 'area', 'genus', 'boundaryLoops', 'components', 'edgeLength', 'warnings']));
    expect(s.vertices).toBe(642);
    expect(s.triangles).toBe(1280);
    expect(s.genus).toBe(0);
    expect(s.area).toBeGreaterThan(12.4);
    expect(s.edgeLength.min).toBeLessThanOrEqual(s.edgeLength.mean);
  });

  it('writes a mesh file that reads back, and refuses to overwrite without --force', async () => {
    const out = join(dir, 'bud.ply');
    const r = await run('mesh', 'limb-bud', '--vertices', '800', '-p', 'paddleWidth=1.1', '--out', out);
    expect(r.code).toBe(0);
    const m = parseMeshFile(readFileSync(out), out);
    expect(m.mesh.positions.length / 3).toBeGreaterThan(600);
    const again = await run('mesh', 'limb-bud', '--vertices', '800', '--out', out);
    expect(again.code).not.toBe(0);
    expect(again.err).toMatch(/already exists; pass --force/);
    expect((await run('mesh', 'limb-bud', '--vertices', '800', '--out', out, '--force')).code).toBe(0);
  });

  it('loads a file, repairs on request, and reports bad files without a stack trace', async () => {
    const stl = join(dir, 'bad.stl');
    writeFileSync(stl, 'solid broken\nfacet normal 0 0 1\n');
    const r = await run('mesh', stl);
    expect(r.code).toBe(1);
    expect(r.err).toContain(`${stl}: ASCII STL ends before "endsolid"`);
    expect(r.err).not.toMatch(/\n\s+at /);
    const missing = await run('mesh', join(dir, 'nope.obj'));
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/neither a built-in shape .* nor an existing mesh file/);
    const obj = join(dir, 'two.obj');
    writeFileSync(obj, 'v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\nf 1 6 4\nf 5 6 1\n');
    const warned = JSON.parse((await run('mesh', obj, '--json')).out);
    expect(warned.warnings.join(' ')).toMatch(/weld/);
    const welded = JSON.parse((await run('mesh', obj, '--weld', '--json')).out);
    expect(welded.vertices).toBe(4);
  });

  it('rejects bad shape parameters with the valid names', async () => {
    const r = await run('mesh', 'torus', '-p', 'radius=2');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/unknown parameter "radius" \(parameters of torus: R, r\)/);
  });
});

describe('placode modes', () => {
  it('prints sphere eigenvalues as JSON and paints chosen modes', async () => {
    const outDir = join(dir, 'modes');
    const r = await run('modes', 'sphere', '-p', 'frequency=12', '--count', '9', '--json', '--paint', '1,4', '--out-dir', outDir, '--quiet');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.vertices).toBe(1442);
    expect(j.eigenvalues).toHaveLength(9);
    expect(j.eigenvalues[0]).toBeCloseTo(0, 8);
    for (let k = 1; k < 4; k++) expect(Math.abs(j.eigenvalues[k] - 2) / 2).toBeLessThan(0.02);
    for (let k = 4; k < 9; k++) expect(Math.abs(j.eigenvalues[k] - 6) / 6).toBeLessThan(0.02);
    expect(j.area).toBeCloseTo(4 * Math.PI, 1);
    expect(j.multiplicities.map((m: { multiplicity: number }) => m.multiplicity)).toEqual([1, 3, 5]);
    expect(existsSync(join(outDir, 'mode-001.ply'))).toBe(true);
    const painted = parseMeshFile(readFileSync(join(outDir, 'mode-004.ply')), 'mode-004.ply');
    expect(painted.vertexData.mode).toHaveLength(1442);
  });

  it('refuses a mesh the FEM cannot use, naming the problem', async () => {
    const obj = join(dir, 'flat.obj');
    writeFileSync(obj, 'v 0 0 0\nv 1 0 0\nv 2 0 0\nv 0 1 0\nf 1 2 3\nf 1 2 4\n');
    const r = await run('modes', obj, '--count', '2');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/cannot be used for surface finite elements:\n\s+- 1 triangles have \(near\) zero area/);
  });
});

describe('placode --help', () => {
  it('lists the subcommands and exits 0', async () => {
    const r = await run('--help');
    expect(r.code).toBe(0);
    expect(r.out + r.err).toMatch(/mesh \[options\] <shape\|file>/);
    expect(r.out + r.err).toMatch(/modes/);
  });
});

describe('the installed entry point', () => {
  it('`node solver/cli/placode.mjs --help` runs the TypeScript CLI in a fresh process', async () => {
    const { execFileSync } = await import('node:child_process');
    const out = execFileSync(process.execPath, ['solver/cli/placode.mjs', 'shapes'], { encoding: 'utf8' });
    expect(out).toMatch(/^limb-bud/m);
    expect(out).toMatch(/^spiral-shell/m);
  });
});
