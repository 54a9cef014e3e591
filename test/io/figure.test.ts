import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { DOMParser } from '@xmldom/xmldom';
import { runCli as run } from '../fixtures/cli.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { saveMeshFile } from '../../solver/io/meshFiles.ts';
import { colormapTable } from '../../solver/io/colormap.ts';

let dir = '';
let frame = '';
const mesh = icosphere(24, 1);
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'placode-figure-'));
  // a frame holding the degree-1 spherical harmonic z
  const n = mesh.positions.length / 3;
  const z = new Float64Array(n);
  for (let i = 0; i < n; i++) z[i] = mesh.positions[3 * i + 2];
  frame = join(dir, 'harmonic.ply');
  saveMeshFile(frame, mesh, { properties: { species_u: z } });
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('placode figure', () => {
  it('a PNG of the harmonic z seen from the front has the colormap at the expected heights, shaded by a headlight', async () => {
    const out = join(dir, 'z.png');
    const r = await run('figure', frame, '-o', out, '--view', 'front', '--range', '-1:1', '--width', '600', '--height', '500', '--dpi', '300');
    expect(r.code, r.err).toBe(0);
    const bytes = readFileSync(out);
    const png = PNG.sync.read(bytes);
    // the sphere's disc: non-white pixels left of the colour bar (which starts 100 px from the right)
    let minX = Infinity, maxX = -1, minY = Infinity, maxY = -1;
    for (let y = 0; y < png.height; y++) {
      for (let x = 0; x < png.width - 102; x++) {
        const o = 4 * (y * png.width + x);
        if (png.data[o] < 250 || png.data[o + 1] < 250 || png.data[o + 2] < 250) { minX = Math.min(minX, x); maxX = Math.max(maxX, x); minY = Math.min(minY, y); maxY = Math.max(maxY, y); }
      }
    }
    const cx = (minX + maxX) / 2, cy = (minY + maxY) / 2, R = (maxY - minY) / 2;
    expect(Math.abs((maxX - minX) - (maxY - minY))).toBeLessThan(4); // a circle
    const lut = colormapTable('viridis');
    // at height z (screen up = +z from the front) the value is z, the normal makes cos = √(1 − z²) with the view
    for (const z of [0, 0.5, -0.5]) {
      const o = 4 * (Math.round(cy - z * R) * png.width + Math.round(cx));
      const k = Math.round(((z + 1) / 2) * 255);
      const shade = 0.35 + 0.65 * Math.sqrt(1 - z * z);
      for (let d = 0; d < 3; d++) expect(Math.abs(png.data[o + d] - lut[3 * k + d] * shade)).toBeLessThanOrEqual(6);
    }
    // 300 dpi recorded in the pHYs chunk right after IHDR (PNG specification §11.3.5.3)
    expect(bytes.subarray(37, 41).toString('latin1')).toBe('pHYs');
    expect(bytes.readUInt32BE(41)).toBe(Math.round(300 / 0.0254));
  });

  it('the SVG parses as XML, holds one polygon per triangle and a colour bar whose ticks span the range', async () => {
    const out = join(dir, 'z.svg');
    const r = await run('figure', frame, '-o', out, '--range', '-1:1', '--title', 'degree-1 harmonic');
    expect(r.code, r.err).toBe(0);
    const errors: string[] = [];
    const doc = new DOMParser({ onError: (level: string, msg: string) => { if (level !== 'warning') errors.push(msg); } }).parseFromString(readFileSync(out, 'utf8'), 'image/svg+xml');
    expect(errors).toEqual([]);
    const polygons = doc.getElementsByTagName('polygon');
    expect(polygons.length).toBe(mesh.triangles.length / 3);
    const texts = Array.from(doc.getElementsByTagName('text'));
    const ticks = texts.filter((t) => t.getAttribute('class') === 'tick').map((t) => Number(t.textContent));
    expect(ticks).toEqual([-1, -0.5, 0, 0.5, 1]);
    expect(texts.find((t) => t.getAttribute('class') === 'species')?.textContent).toBe('u');
    expect(texts.find((t) => t.getAttribute('class') === 'title')?.textContent).toBe('degree-1 harmonic');
  });

  it('refuses a bad view, a bad range and an unknown output type with clear messages', async () => {
    const cases: [string[], RegExp][] = [
      [['--view', 'sideways'], /--view "sideways": a preset \(front, back, left, right, top, bottom, iso\) or azimuth,elevation/],
      [['--range', '2:1'], /--range "2:1" should be min:max with max > min, or run/],
      [['--range', 'run'], /--range run takes the range over every frame of a run directory/],
      [['-o', join(dir, 'z.jpg')], /write \.png or \.svg/],
    ];
    for (const [args, pattern] of cases) {
      const r = await run('figure', frame, '-o', join(dir, 'bad.png'), ...args);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(pattern);
    }
  });
});

describe('colormaps', () => {
  it('match the reference tables of matplotlib (van der Walt & Smith, 2015) at sample points', () => {
    // entries 0, 128 and 255 of matplotlib's _viridis_data and _magma_data (values quoted from memory
    // of the published tables; #440154 … #21918c … #fde725 for viridis)
    const reference: Record<string, [number, number[]][]> = {
      viridis: [[0, [0.267004, 0.004874, 0.329415]], [128, [0.127568, 0.566949, 0.550556]], [255, [0.993248, 0.906157, 0.143936]]],
      magma: [[0, [0.001462, 0.000466, 0.013866]], [255, [0.987053, 0.991438, 0.749504]]],
    };
    for (const [name, points] of Object.entries(reference)) {
      const lut = colormapTable(name as 'viridis' | 'magma');
      for (const [k, rgb] of points) for (let d = 0; d < 3; d++) expect(Math.abs(lut[3 * k + d] - rgb[d] * 255)).toBeLessThanOrEqual(1);
    }
  });
});
