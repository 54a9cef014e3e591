import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { NodeIO } from '@gltf-transform/core';
import validator from 'gltf-validator';
import { PLYLoader } from 'three/examples/jsm/loaders/PLYLoader.js';
import { OBJLoader } from 'three/examples/jsm/loaders/OBJLoader.js';
import { runCli as run } from '../fixtures/cli.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';
import { speciesFromProperties } from '../../solver/run/runFiles.ts';
import { colorizeField, colormapTable } from '../../solver/io/colormap.ts';
import { linearToSrgb, srgbToLinear } from '../../solver/io/writeGlb.ts';

let dir = '';
let runDir = '';
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'placode-export-'));
  const file = join(dir, 's.yaml');
  writeFileSync(file, `
seed: 2
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 800}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 3, radius: 0.06, values: {u: 0.5, v: 0.25}}}
time: {scheme: explicit, end: 300}
output: {every: 100}
analysis: {modes: 0}
`);
  runDir = join(dir, 'run');
  const r = await run('run', file, '--out', runDir, '--progress', 'none');
  if (r.code !== 0) throw new Error(r.err);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A colour component of a three.js attribute as a float (uchar attributes come normalised). */
const component = (attr: { array: ArrayLike<number>; normalized: boolean }, i: number) => (attr.normalized ? attr.array[i] / 255 : attr.array[i]);

const arrayBuffer = (b: Buffer) => b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;

describe('placode export', () => {
  it('binary glTF passes the Khronos validator; COLOR_0 is linear and reads back as the PLY colours within 1/255', async () => {
    const out = join(dir, 'final.glb');
    const r = await run('export', runDir, '--format', 'glb', '-o', out, '--species', 'v');
    expect(r.code, r.err).toBe(0);
    const bytes = new Uint8Array(readFileSync(out));
    const report = await validator.validateBytes(bytes);
    expect(report.issues.numErrors).toBe(0);
    expect(report.issues.numWarnings).toBe(0);
    const doc = await new NodeIO().readBinary(bytes);
    const prim = doc.getRoot().listMeshes()[0].listPrimitives()[0];
    const frame = loadMeshFile(join(runDir, 'final.ply'));
    const v = speciesFromProperties(frame.vertexData).v;
    const expected = colorizeField(v, 'viridis');
    const colour = prim.getAttribute('COLOR_0')!.getArray()!;
    for (let i = 0; i < expected.length; i++) expect(Math.abs(linearToSrgb(colour[i]) - expected[i])).toBeLessThanOrEqual(1);
    // the species travel as underscore-prefixed application attributes (glTF 2.0 §3.7.2.1)
    const raw = prim.getAttribute('_V')!.getArray()!;
    for (let i = 0; i < v.length; i++) expect(raw[i]).toBe(Math.fround(v[i]));
    expect(prim.getAttribute('NORMAL')).not.toBeNull();
  });

  it('PLY and OBJ read back through three.js loaders with the same positions, triangles and colours', async () => {
    const frame = loadMeshFile(join(runDir, 'final.ply'));
    const colors = colorizeField(speciesFromProperties(frame.vertexData).v, 'magma');
    for (const ascii of [false, true]) {
      const out = join(dir, `final${ascii ? '-ascii' : ''}.ply`);
      expect((await run('export', runDir, '-o', out, '--species', 'v', '--colormap', 'magma', ...(ascii ? ['--ascii'] : []))).code).toBe(0);
      const g = new PLYLoader().parse(arrayBuffer(readFileSync(out)));
      const pos = g.getAttribute('position').array, col = g.getAttribute('color');
      for (let i = 0; i < frame.mesh.positions.length; i++) expect(pos[i]).toBe(Math.fround(frame.mesh.positions[i]));
      expect(Array.from(g.getIndex()!.array)).toEqual(Array.from(frame.mesh.triangles));
      // three.js colour management turns the file's sRGB bytes into linear values (kept as bytes)
      for (let i = 0; i < colors.length; i++) expect(Math.abs(component(col, i) - srgbToLinear(colors[i]))).toBeLessThanOrEqual(0.51 / 255);
    }
    const obj = join(dir, 'final.obj');
    expect((await run('export', runDir, '--format', 'obj', '-o', obj, '--species', 'v', '--colormap', 'magma')).code).toBe(0);
    // three's OBJ loader expands faces: corner k of triangle t is vertex triangles[3t + k]
    const group = new OBJLoader().parse(readFileSync(obj, 'utf8'));
    const geo = (group.children[0] as unknown as { geometry: { getAttribute(n: string): { array: ArrayLike<number>; normalized: boolean } } }).geometry;
    const pos = geo.getAttribute('position').array, col = geo.getAttribute('color');
    const tri = frame.mesh.triangles;
    for (let c = 0; c < tri.length; c++) {
      for (let d = 0; d < 3; d++) {
        expect(pos[3 * c + d]).toBeCloseTo(frame.mesh.positions[3 * tri[c] + d], 6);
        expect(Math.abs(component(col, 3 * c + d) - srgbToLinear(colors[3 * tri[c] + d]))).toBeLessThanOrEqual(0.51 / 255);
      }
    }
  });

  it('CSV per vertex, every frame with one colour range over the run, and no overwriting without --force', async () => {
    const csv = join(dir, 'final.csv');
    expect((await run('export', runDir, '--format', 'csv', '-o', csv)).code).toBe(0);
    const lines = readFileSync(csv, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('x,y,z,u,v');
    expect(lines.length).toBe(1 + loadMeshFile(join(runDir, 'final.ply')).mesh.positions.length / 3);
    const all = join(dir, 'all');
    const r = await run('export', runDir, '--all', '--range', 'run', '-o', all);
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(all).sort()).toEqual(['0000.ply', '0001.ply', '0002.ply', '0003.ply', 'final.ply']);
    // one range over the run: the vertex with the run's lowest v, wherever it is, gets the map's first colour
    let lowest = Infinity, where = '', at = -1;
    for (const f of readdirSync(all)) {
      const v = speciesFromProperties(loadMeshFile(join(all, f)).vertexData).v;
      v.forEach((x, i) => { if (x < lowest) { lowest = x; where = f; at = i; } });
    }
    const g = new PLYLoader().parse(arrayBuffer(readFileSync(join(all, where))));
    const first = colormapTable('viridis');
    for (let d = 0; d < 3; d++) expect(Math.abs(component(g.getAttribute('color'), 3 * at + d) - srgbToLinear(first[d]))).toBeLessThanOrEqual(0.51 / 255);
    const again = await run('export', runDir, '--format', 'csv', '-o', csv);
    expect(again.code).toBe(1);
    expect(again.err).toMatch(/already exists; pass --force/);
    const bad = await run('export', runDir, '--frame', '9', '-o', join(dir, 'x.ply'));
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--frame 9: the run has frames 0–3/);
  });
});

describe('animated glTF of a growing run', () => {
  it('one .glb plays the growth and the colours: a morph target per frame, weights animated over the frame times', async () => {
    const file = join(dir, 'grow.yaml');
    writeFileSync(file, `
mesh: {shape: sphere, vertices: 300}
kinetics: {model: schnakenberg, parameters: {gamma: 30}}
initial: {noise: 0.05}
time: {scheme: imex, step: 0.005, end: 3}
output: {every: 1}
growth: {law: uniform, rate: 0.2}
analysis: {modes: 0}
`);
    const growDir = join(dir, 'grow');
    expect((await run('run', file, '--out', growDir, '--progress', 'none')).code).toBe(0);
    const out = join(dir, 'grow.glb');
    const r = await run('export', growDir, '--format', 'glb', '--animate', '--range', 'run', '--duration', '6', '-o', out);
    expect(r.code, r.err).toBe(0);
    const bytes = new Uint8Array(readFileSync(out));
    const report = await validator.validateBytes(bytes);
    expect(report.issues.numErrors).toBe(0);
    const doc = await new NodeIO().readBinary(bytes);
    const prim = doc.getRoot().listMeshes()[0].listPrimitives()[0];
    const targets = prim.listTargets();
    expect(targets.length).toBe(3); // frames at t = 0, 1, 2, 3
    const sampler = doc.getRoot().listAnimations()[0].listSamplers()[0];
    expect(Array.from(sampler.getInput()!.getArray()!)).toEqual([0, 2, 4, 6]);
    // frame 3 = base + target 3: the sphere grown by e^{0.2·3}
    const base = prim.getAttribute('POSITION')!.getArray()!, d3 = targets[2].getAttribute('POSITION')!.getArray()!;
    for (let i = 0; i < base.length; i += 3) expect(Math.hypot(base[i] + d3[i], base[i + 1] + d3[i + 1], base[i + 2] + d3[i + 2]) / Math.hypot(base[i], base[i + 1], base[i + 2])).toBeCloseTo(Math.exp(0.6), 5);
  });
});

describe('formats written by the run command', () => {
  it('output.formats adds glTF, OBJ or CSV beside every frame and the final state', async () => {
    const file = join(dir, 'formats.yaml');
    writeFileSync(file, `
mesh: {shape: sphere, vertices: 300}
kinetics: {model: schnakenberg, parameters: {gamma: 30}}
initial: {noise: 0.05}
time: {scheme: imex, step: 0.005, end: 1}
output: {every: 0.5, formats: [glb, csv]}
analysis: {modes: 0}
`);
    const out = join(dir, 'formats');
    const r = await run('run', file, '--out', out, '--progress', 'none');
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(join(out, 'frames')).sort()).toEqual(['0000.csv', '0000.glb', '0000.ply', '0001.csv', '0001.glb', '0001.ply', '0002.csv', '0002.glb', '0002.ply']);
    for (const f of ['frames/0001.glb', 'final.glb']) expect((await validator.validateBytes(new Uint8Array(readFileSync(join(out, f))))).issues.numErrors).toBe(0);
    expect(readFileSync(join(out, 'final.csv'), 'utf8').split('\n')[0]).toBe('x,y,z,u,v');
  });
});
