import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { DOMParser } from '@xmldom/xmldom';
import { runCli as run } from '../fixtures/cli.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { saveMeshFile } from '../../solver/io/meshFiles.ts';
import { colorizeField, colormapTable } from '../../solver/io/colormap.ts';
import { loadMeshFile } from '../../solver/io/meshFiles.ts';
import { speciesFromProperties } from '../../solver/run/runFiles.ts';
import { createRequire } from 'node:module';
import type { Browser } from 'playwright-core';
import { haveChromium, launchChromium } from '../viewer/browser.ts';

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

/** The colour bar's rectangle in a figure's SVG (the PNG is rendered from the same drawing). */
function barOf(svg: string): { x: number; y: number; width: number; height: number } {
  const m = /<rect x="([0-9.]+)" y="([0-9.]+)" width="([0-9.]+)" height="([0-9.]+)" fill="url\(#bar\)"/.exec(svg);
  if (!m) throw new Error('no colour bar in the SVG');
  return { x: Number(m[1]), y: Number(m[2]), width: Number(m[3]), height: Number(m[4]) };
}

/** Bounding box of the pixels darker than `level` inside a region. */
function inkBox(png: PNG, region: { x0: number; x1: number; y0: number; y1: number }, level = 128) {
  let minX = Infinity, maxX = -1, minY = Infinity, maxY = -1;
  for (let y = region.y0; y < region.y1; y++) {
    for (let x = region.x0; x < region.x1; x++) {
      const o = 4 * (y * png.width + x);
      if (png.data[o] < level && png.data[o + 1] < level && png.data[o + 2] < level) { minX = Math.min(minX, x); maxX = Math.max(maxX, x); minY = Math.min(minY, y); maxY = Math.max(maxY, y); }
    }
  }
  return { minX, maxX, minY, maxY, height: maxY - minY + 1 };
}

/** A font's cap height in em: the height of 'H' over units per em, read by opentype.js (a general-purpose font parser). */
function capHeightEm(ttf: Buffer): number {
  const opentype = createRequire(import.meta.url)('opentype.js') as { parse(b: ArrayBuffer): { unitsPerEm: number; charToGlyph(c: string): { getBoundingBox(): { y1: number; y2: number } } } };
  const font = opentype.parse(ttf.buffer.slice(ttf.byteOffset, ttf.byteOffset + ttf.byteLength) as ArrayBuffer);
  const box = font.charToGlyph('H').getBoundingBox();
  return (box.y2 - box.y1) / font.unitsPerEm;
}

describe('placode figure', () => {
  it('a PNG of the harmonic z seen from the front has the colormap at the expected heights: exactly (no shading), within 15 % (soft), under a headlight', async () => {
    const lut = colormapTable('viridis');
    for (const shading of ['none', 'soft', 'headlight'] as const) {
      const out = join(dir, `z-${shading}.png`);
      const r = await run('figure', frame, '-o', out, '--view', 'front', '--range', '-1:1', '--width', '600', '--height', '500', '--dpi', '300', '--shading', shading, '--force');
      expect(r.code, r.err).toBe(0);
      const svg = join(dir, `z-${shading}.svg`);
      expect((await run('figure', frame, '-o', svg, '--view', 'front', '--range', '-1:1', '--width', '600', '--height', '500', '--dpi', '300', '--shading', shading, '--force')).code).toBe(0);
      const bar = barOf(readFileSync(svg, 'utf8'));
      const bytes = readFileSync(out);
      const png = PNG.sync.read(bytes);
      // the sphere's disc: coloured pixels left of the colour bar
      const disc = inkBox(png, { x0: 0, x1: Math.floor(bar.x) - 2, y0: 0, y1: png.height }, 250);
      const cx = (disc.minX + disc.maxX) / 2, cy = (disc.minY + disc.maxY) / 2, R = (disc.maxY - disc.minY) / 2;
      expect(Math.abs((disc.maxX - disc.minX) - (disc.maxY - disc.minY))).toBeLessThan(4); // a circle
      // at height z (screen up = +z from the front) the value is z; the normal makes cos = √(1 − z²) with the view
      for (const z of [0, 0.5, -0.5]) {
        const o = 4 * (Math.round(cy - z * R) * png.width + Math.round(cx));
        const k = Math.round(((z + 1) / 2) * 255);
        const floor = { none: 1, soft: 0.85, headlight: 0.35 }[shading];
        const shade = floor + (1 - floor) * Math.sqrt(1 - z * z);
        for (let d = 0; d < 3; d++) expect(Math.abs(png.data[o + d] - lut[3 * k + d] * shade)).toBeLessThanOrEqual(6);
      }
      // 300 dpi recorded in the pHYs chunk right after IHDR (PNG specification §11.3.5.3)
      expect(bytes.subarray(37, 41).toString('latin1')).toBe('pHYs');
      expect(bytes.readUInt32BE(41)).toBe(Math.round(300 / 0.0254));
    }
  });

  it('PNG text is set in points from the DejaVu Sans font: cap heights follow the dpi and the font\'s own metrics, as the SVG sizes them', async () => {
    const cap = capHeightEm(readFileSync(createRequire(import.meta.url).resolve('dejavu-fonts-ttf/ttf/DejaVuSans.ttf')));
    const heights: number[] = [];
    for (const dpi of [150, 300]) {
      const png = join(dir, `title-${dpi}.png`), svg = join(dir, `title-${dpi}.svg`);
      for (const out of [png, svg]) expect((await run('figure', frame, '-o', out, '--title', 'HEIGHT', '--dpi', String(dpi), '--width', '1200', '--height', '900', '--force')).code).toBe(0);
      const text = readFileSync(svg, 'utf8');
      const title = /<text class="title"[^>]*font-size="([0-9.]+)"[^>]*>([^<]*)<\/text>/.exec(text)!;
      expect(title[2]).toBe('HEIGHT');
      const size = Number(title[1]);
      expect(size).toBeCloseTo((12 * dpi) / 72, 1); // 12 points
      const image = PNG.sync.read(readFileSync(png));
      const bar = barOf(text);
      // the title's ink, above the panels: every glyph of HEIGHT is a capital standing on the baseline
      const ink = inkBox(image, { x0: 0, x1: Math.floor(bar.x), y0: 0, y1: Math.ceil(2 * size) });
      // within a pixel at the top and at the bottom (antialiased edges cut at half ink)
      expect(Math.abs(ink.height - cap * size)).toBeLessThanOrEqual(2);
      heights.push(ink.height);
    }
    expect(heights[1] / heights[0]).toBeGreaterThan(1.9);
    expect(heights[1] / heights[0]).toBeLessThan(2.1);
  });

  it('the SVG parses as XML: the surface as one embedded image by default or one polygon per triangle (--vector); a colour bar with its end values and round ticks clear of their labels', async () => {
    for (const vector of [false, true]) {
      const out = join(dir, vector ? 'z-vector.svg' : 'z.svg');
      const r = await run('figure', frame, '-o', out, '--range', '-1:1', '--title', 'degree-1 harmonic', ...(vector ? ['--vector'] : []));
      expect(r.code, r.err).toBe(0);
      const errors: string[] = [];
      const doc = new DOMParser({ onError: (level: string, msg: string) => { if (level !== 'warning') errors.push(msg); } }).parseFromString(readFileSync(out, 'utf8'), 'image/svg+xml');
      expect(errors).toEqual([]);
      expect(doc.getElementsByTagName('polygon').length).toBe(vector ? mesh.triangles.length / 3 : 0);
      expect(doc.getElementsByTagName('image').length).toBe(vector ? 0 : 1);
      const texts = Array.from(doc.getElementsByTagName('text'));
      const number = (t: { textContent: string | null }) => Number((t.textContent ?? '').replace(/−/g, '-'));
      expect(texts.filter((t) => t.getAttribute('class') === 'end').map(number)).toEqual([-1, 1]);
      expect(texts.filter((t) => t.getAttribute('class') === 'tick').map(number)).toEqual([-0.5, 0, 0.5]);
      // ticks end before their labels start
      const lines = Array.from(doc.getElementsByTagName('line'));
      for (const t of texts.filter((e) => /tick|end/.test(e.getAttribute('class') ?? ''))) {
        const y = Number(t.getAttribute('y'));
        const line = lines.find((l) => Math.abs(Number(l.getAttribute('y1')) - y) < Number(t.getAttribute('font-size')))!;
        expect(Number(t.getAttribute('x')) - Number(line.getAttribute('x2'))).toBeGreaterThan(2);
      }
      expect(texts.find((t) => t.getAttribute('class') === 'species')?.textContent).toBe('u');
      expect(texts.find((t) => t.getAttribute('class') === 'title')?.textContent).toBe('degree-1 harmonic');
    }
  });

  it('a painted mode is a figure captioned with its eigenvalue, on the diverging colormap, symmetric about zero', async () => {
    const modes = join(dir, 'modes');
    const m = await run('modes', 'sphere', '--vertices', '642', '-n', '9', '--paint', '5', '--out-dir', modes, '--json');
    expect(m.code, m.err).toBe(0);
    const eigenvalue = JSON.parse(m.out).eigenvalues[5];
    // l = 2 on the unit sphere: l(l + 1) = 6, the P1 value a little below (O(h²))
    expect(Math.abs(eigenvalue - 6) / 6).toBeLessThan(0.03);
    const out = join(dir, 'mode.svg');
    const r = await run('figure', join(modes, 'mode-005.ply'), '-o', out);
    expect(r.code, r.err).toBe(0);
    const text = readFileSync(out, 'utf8');
    expect(text).toContain(`>mode, λ = ${Number(eigenvalue.toPrecision(5))}</text>`);
    const ends = [...text.matchAll(/<text class="end"[^>]*>([^<]*)<\/text>/g)].map((e) => Number(e[1].replace(/−/g, '-')));
    expect(ends[0]).toBeCloseTo(-ends[1], 3);
    const lut = colormapTable('diverging');
    expect(text).toContain(`stop-color="rgb(${lut[0]},${lut[1]},${lut[2]})"`);
    // --field picks any scalar property; one the file lacks is named with those it has
    expect((await run('figure', join(modes, 'mode-005.ply'), '-o', join(dir, 'f.png'), '--field', 'mode')).code).toBe(0);
    const bad = await run('figure', join(modes, 'mode-005.ply'), '-o', join(dir, 'g.png'), '--field', 'height');
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--field height: .* has the scalar vertex properties mode/);
  });

  it('refuses a bad view, a bad range, a bad shading and an unknown output type with clear messages', async () => {
    const cases: [string[], RegExp][] = [
      [['--view', 'sideways'], /--view "sideways": a preset \(front, back, left, right, top, bottom, iso\) or azimuth,elevation/],
      [['--range', '2:1'], /--range "2:1" should be min:max with max > min, or run/],
      [['--range', 'run'], /--range run takes the range over every frame of a run directory/],
      [['--shading', 'glossy'], /--shading glossy: choose none, soft, headlight/],
      [['--vector'], /--vector draws the surface as SVG triangles: use it with an \.svg output/],
      [['-o', join(dir, 'z.jpg')], /write \.png or \.svg/],
    ];
    for (const [args, pattern] of cases) {
      const r = await run('figure', frame, '-o', join(dir, 'bad.png'), ...args);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(pattern);
    }
  });
});

describe('figures and exports of a run paint as the run did', () => {
  it('species, colormap and fixed range come from the run\'s output section; a 13-frame sheet as SVG stays under 1.5 MB', async () => {
    const scenario = join(dir, 'painted.yaml');
    writeFileSync(scenario, `
seed: 4
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 5000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 4, radius: 0.04, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 120}
output: {every: 10, colour: u, colormap: magma, range: [0, 1]}
analysis: {modes: 0}
`);
    const runDir = join(dir, 'painted');
    expect((await run('run', scenario, '--out', runDir, '--progress', 'none')).code).toBe(0);
    const svg = join(dir, 'painted.svg');
    expect((await run('figure', runDir, '-o', svg)).code).toBe(0);
    const text = readFileSync(svg, 'utf8');
    const magma = colormapTable('magma');
    expect(text).toContain(`stop-color="rgb(${magma[3 * 255]},${magma[3 * 255 + 1]},${magma[3 * 255 + 2]})"`);
    expect(/<text class="species"[^>]*>u<\/text>/.test(text)).toBe(true);
    expect([...text.matchAll(/<text class="end"[^>]*>([^<]*)<\/text>/g)].map((m) => m[1])).toEqual(['0', '1']);
    // told otherwise, it paints otherwise
    const other = join(dir, 'other.svg');
    expect((await run('figure', runDir, '-o', other, '--species', 'v', '--colormap', 'viridis')).code).toBe(0);
    expect(/<text class="species"[^>]*>v<\/text>/.test(readFileSync(other, 'utf8'))).toBe(true);
    // the export's colours (OBJ vertex colours, sRGB in [0, 1]): u on magma over [0, 1]
    const obj = join(dir, 'painted.obj');
    expect((await run('export', runDir, '--format', 'obj', '-o', obj)).code).toBe(0);
    const u = speciesFromProperties(loadMeshFile(join(runDir, 'final.ply')).vertexData).u;
    const expected = colorizeField(u, 'magma', [0, 1]);
    const vertices = readFileSync(obj, 'utf8').split('\n').filter((l) => l.startsWith('v ')).map((l) => l.split(' ').slice(4).map(Number));
    expect(vertices.length).toBe(u.length);
    for (const i of [0, 100, 2000]) for (let d = 0; d < 3; d++) expect(Math.abs(vertices[i][d] * 255 - expected[3 * i + d])).toBeLessThanOrEqual(0.5);
    // every frame on one sheet
    const sheet = join(dir, 'sheet.svg');
    expect((await run('figure', runDir, '--sheet', '-o', sheet)).code).toBe(0);
    const bytes = readFileSync(sheet).length;
    expect((readFileSync(sheet, 'utf8').match(/<text class="label"/g) ?? []).length).toBe(13);
    expect(bytes).toBeLessThan(1.5e6);
  }, 60_000);
});

describe.skipIf(!haveChromium)('PNG and SVG of the same figure look alike (the SVG drawn by Chromium)', () => {
  let browser: Browser;
  beforeAll(async () => { browser = await launchChromium(); }, 60_000);
  afterAll(async () => { await browser?.close(); });

  it('pixel by pixel: mean difference under 1 % of full scale, fewer than 1 % of pixels off by more than a quarter', async () => {
    const png = join(dir, 'same.png'), svg = join(dir, 'same.svg');
    for (const out of [png, svg]) expect((await run('figure', frame, '-o', out, '--title', 'the degree-1 harmonic, t = 2', '--width', '600', '--height', '450', '--dpi', '150', '--force')).code).toBe(0);
    const ours = PNG.sync.read(readFileSync(png));
    const page = await browser.newPage({ viewport: { width: 600, height: 450 }, deviceScaleFactor: 1 });
    const markup = readFileSync(svg, 'utf8').replace(/width="[0-9.]+pt" height="[0-9.]+pt"/, 'width="600" height="450"');
    await page.setContent(`<html><body style="margin:0">${markup}</body></html>`);
    const shot = PNG.sync.read(await page.screenshot({ clip: { x: 0, y: 0, width: 600, height: 450 } }));
    await page.close();
    let sum = 0, off = 0;
    for (let p = 0; p < 600 * 450; p++) {
      let worst = 0;
      for (let d = 0; d < 3; d++) {
        const diff = Math.abs(ours.data[4 * p + d] - shot.data[4 * p + d]);
        sum += diff;
        worst = Math.max(worst, diff);
      }
      if (worst > 64) off++;
    }
    const mean = sum / (600 * 450 * 3 * 255);
    console.log(`PNG against Chromium's drawing of the SVG: mean difference ${(100 * mean).toFixed(2)} %, ${(100 * off / (600 * 450)).toFixed(2)} % of pixels off by more than 64/255`);
    expect(mean).toBeLessThan(0.01);
    expect(off / (600 * 450)).toBeLessThan(0.01);
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
