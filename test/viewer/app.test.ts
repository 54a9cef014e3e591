import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { PNG } from 'pngjs';
import validator from 'gltf-validator';
import { haveChromium } from './browser.ts';
import { close, open as openPage, setUpText, startViewers, state, type AppState, type Viewers } from './viewerPage.ts';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';
import { parseMeshFile } from '../../solver/io/parseMeshFile.ts';
import { speciesFromProperties } from '../../solver/run/runFiles.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { writeObj } from '../../solver/io/writeObj.ts';
import { writeStl } from '../../solver/io/writeStl.ts';

let dir = '';
let browser: Browser;
let appUrl = '';
let runUrl = '';

/** A small growing run for the timeline: a sphere doubling its area, refined once. */
const GROWING = `
seed: 2
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 400}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 3, radius: 0.08, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 400}
output: {every: 100, colour: u, colormap: magma, range: [0.2, 1]}
growth: {law: uniform, rate: 0.002, refine: {edgeGrowth: 1.4}}
analysis: {modes: 0}
`;

/** Gray–Scott on a small sphere, uniform state (no spots, no noise): what the brush paints is all there is. */
const QUIET = `
seed: 1
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 2000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
time: {scheme: imex, step: 1, end: 100000}
output: {every: 50, colour: v}
`;

let viewers: Viewers | undefined;
beforeAll(async () => {
  if (!haveChromium) return;
  viewers = await startViewers(GROWING, 'growing-run');
  ({ browser, appUrl, runUrl, dir } = viewers);
}, 120_000);

afterAll(async () => {
  await viewers?.stop();
});

const open = (url: string) => openPage(browser, url, url === runUrl);

/** A short brush stroke starting at (x, y). */
async function stroke(page: Page, x: number, y: number) {
  await page.mouse.move(x, y);
  await page.mouse.down();
  await page.mouse.move(x + 8, y + 4, { steps: 4 });
  await page.mouse.up();
}

/** Whether pixel i of a screenshot shows something other than the stage's background (#f4f2ee). */
function drawn(png: PNG, i: number): boolean {
  return Math.abs(png.data[4 * i] - 0xf4) + Math.abs(png.data[4 * i + 1] - 0xf2) + Math.abs(png.data[4 * i + 2] - 0xee) > 12;
}

/** Until the page has drawn what it was asked to: two animation frames (the surface renders on the first). */
const settled = (page: Page) => page.evaluate(() => new Promise<void>((done) => requestAnimationFrame(() => requestAnimationFrame(() => done()))));

/** Pixels of the surface area of a screenshot of the stage: how many differ from the background, and how many colours. */
async function stagePixels(page: Page): Promise<{ png: PNG; covered: number; colours: number }> {
  const png = PNG.sync.read(await page.locator('#stage').screenshot());
  let covered = 0;
  const colours = new Set<number>();
  for (let i = 0; i < png.width * png.height; i++) {
    if (!drawn(png, i)) continue;
    covered++;
    const r = png.data[4 * i], g = png.data[4 * i + 1], b = png.data[4 * i + 2];
    colours.add(((r >> 3) << 10) | ((g >> 3) << 5) | (b >> 3));
  }
  return { png, covered: covered / (png.width * png.height), colours: colours.size };
}

function pixelChange(a: PNG, b: PNG): number {
  let changed = 0;
  for (let i = 0; i < a.width * a.height; i++) {
    const d = Math.abs(a.data[4 * i] - b.data[4 * i]) + Math.abs(a.data[4 * i + 1] - b.data[4 * i + 1]) + Math.abs(a.data[4 * i + 2] - b.data[4 * i + 2]);
    if (d > 24) changed++;
  }
  return changed / (a.width * a.height);
}

describe.skipIf(!haveChromium)('the viewer in Chromium (software WebGL)', () => {
  it('opens a shape and runs Gray–Scott for a few hundred steps: the surface is drawn, coloured and changing', async () => {
    const page = await open(appUrl);
    // the form: a torus with its own radii, then Set up
    await page.selectOption('#tissue-shape', 'torus');
    await page.fill('#shape-params [data-param="R"]', '0.3');
    await page.fill('#shape-params [data-param="r"]', '0.12');
    await page.fill('#tissue-vertices', '5000');
    await page.click('#setup');
    await page.waitForFunction(() => /genus 1/.test(document.querySelector('#tissue-stats')!.textContent ?? ''), null, { timeout: 30_000 });
    const start = await state(page);
    expect(start.vertices).toBeGreaterThan(4000);
    const area = Number(/area ([0-9.]+)/.exec((await page.textContent('#tissue-stats'))!)![1]);
    expect(area).toBeCloseTo(4 * Math.PI ** 2 * 0.3 * 0.12, 1); // a torus: 4π²Rr
    const before = await stagePixels(page);
    expect(before.covered).toBeGreaterThan(0.15);
    // edges drawn over the surface change the picture
    await page.check('#wireframe');
    await settled(page);
    expect(pixelChange(before.png, (await stagePixels(page)).png)).toBeGreaterThan(0.01); // unchanged state: only the edges differ
    await page.uncheck('#wireframe');
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur()); // keys go to the page, not the checkbox
    await page.keyboard.press('Space'); // start
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.step >= 300, null, { timeout: 90_000 });
    await page.click('#run'); // pause
    await page.waitForFunction(() => !(window as unknown as { __placode: AppState }).__placode.running);
    const after = await state(page);
    expect(after.shown!.species).toBe('v');
    expect(after.shown!.max - after.shown!.min).toBeGreaterThan(0.1); // spots of v against v ≈ 0
    expect(after.frames).toBeGreaterThan(1);
    const shot = await stagePixels(page);
    expect(shot.colours).toBeGreaterThan(30); // a colour map, not one flat colour
    expect(pixelChange(before.png, shot.png)).toBeGreaterThan(0.01);
    expect(await page.textContent('#status-time')).toMatch(/t = \d+/);
    // the stability tab describes the state analysed
    await page.waitForFunction(() => /steady state u = 1, v = 0/.test(document.querySelector('#stability-summary')!.textContent ?? ''), null, { timeout: 60_000 });
    await close(page);
  }, 150_000);

  it('the stability view: the unstable band, the sphere\'s eigenvalues on the dispersion curve, and the predicted mode painted', async () => {
    const page = await open(appUrl);
    // Schnakenberg with its defaults (γ = 200, a = 0.1, b = 0.9, d = 10) on the unit sphere
    await setUpText(page, 'seed: 1\nmesh: {shape: sphere, vertices: 1500}\nkinetics: {model: schnakenberg}\ntime: {end: 1}\n');
    await page.waitForFunction(() => (window as unknown as { __placode: { stability: unknown } }).__placode.stability !== null, null, { timeout: 60_000 });
    const st = await page.evaluate(() => (window as unknown as { __placode: { stability: { band: [number, number]; predicted: { index: number; eigenvalue: number; multiplicity: number }; eigenvalues: number[] } } }).__placode.stability);
    // the band edges solve d k⁴ − γ(d f_u + g_v) k² + γ² det J = 0 (Murray 2003, Mathematical Biology II, ch. 2; form from memory):
    // at u* = a + b = 1, v* = b/(a + b)² = 0.9, f_u = 0.8, g_v = −1, det J = 1, so k⁴ − 140 k² + 4000 = 0: k² = 40 and 100
    expect(st.band[0]).toBeCloseTo(40, 6);
    expect(st.band[1]).toBeCloseTo(100, 6);
    // on the unit sphere the eigenvalues are l(l+1) with multiplicity 2l+1; the fastest k² ≈ 63.7 falls nearest l = 8 (72),
    // which P1 elements on ~1500 vertices reach within a few per cent (O(h²))
    expect(st.predicted.multiplicity).toBe(17);
    expect(Math.abs(st.predicted.eigenvalue - 72) / 72).toBeLessThan(0.06);
    expect(await page.locator('.mode-mark').count()).toBeGreaterThan(50);
    expect(await page.textContent('#stability-summary')).toMatch(/unstable band k² ∈ \[40, 100\]/);
    await page.click(`#mode-list button[data-mode="${st.predicted.index}"]`);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.view === 'mode');
    expect(await page.textContent('#view-caption')).toMatch(new RegExp(`eigenmode ${st.predicted.index}, λ = 6`));
    const mode = (await state(page)).shown!;
    expect(mode.min).toBeLessThan(0);
    expect(mode.max).toBeGreaterThan(0);
    await page.click('#show-live');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.view === 'live');
    await close(page);
  }, 90_000);

  it('brushing seeds a spot of the second species where the pointer goes, and the erase brush takes it back', async () => {
    const page = await open(appUrl);
    await setUpText(page, QUIET);
    expect((await state(page)).shown!.max).toBeLessThan(1e-12);
    // a fixed colour range, so that only the spot changes colour
    await page.selectOption('#paint-range', 'fixed');
    await page.fill('#range-min', '0');
    await page.fill('#range-max', '0.3');
    await page.click('#tool-seed');
    await page.fill('#brush-size', '12'); // a brush of 12 % of the surface's radius
    const box = (await page.locator('#surface-canvas').boundingBox())!;
    const cx = box.x + box.width / 2, cy = box.y + box.height / 2;
    const before = await stagePixels(page);
    await stroke(page, cx, cy);
    // the spot value of v where the dabs overlap (paints come at most every 50 ms: wait for the one after the last dab)
    await page.waitForFunction(() => Math.abs((window as unknown as { __placode: AppState }).__placode.shown!.max - 0.25) < 0.005, null, { timeout: 20_000 });
    await settled(page);
    const seeded = await stagePixels(page);
    const change = pixelChange(before.png, seeded.png);
    await page.locator('#stage').screenshot({ path: join(tmpdir(), 'placode-brush.png') });
    expect(change).toBeGreaterThan(0.005);
    expect(change).toBeLessThan(0.2); // a spot, not the whole surface
    await page.click('#tool-erase');
    await stroke(page, cx, cy);
    // each dab blends a vertex towards its target with a weight w ∈ [0, 1]; the same dabs seeding then erasing
    // leave 0.25·(1 − P)·P ≤ 0.0625 with P = Π(1 − w): the smooth rim of a stroke keeps at most a quarter of the spot
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.shown!.max < 0.0625 + 1e-9, null, { timeout: 20_000 });
    await close(page);
  }, 120_000);

  it('loads a growing run directory from the server and scrubs through it: the surface grows and is refined', async () => {
    const page = await open(runUrl);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.serverRun !== null, null, { timeout: 30_000 });
    const first = await state(page);
    expect(first.serverRun!.frames).toBe(5); // t = 0, 100, …, 400
    expect(first.view).toBe('frame');
    // painted as the run painted its frames: u on magma over the fixed [0.2, 1]
    expect(await page.inputValue('#paint-species')).toBe('u');
    expect(await page.inputValue('#paint-colormap')).toBe('magma');
    expect(await page.inputValue('#paint-range')).toBe('fixed');
    expect([await page.inputValue('#range-min'), await page.inputValue('#range-max')]).toEqual(['0.2', '1']);
    const record = JSON.parse(readFileSync(join(dir, 'growing-run', 'record.json'), 'utf8'));
    expect(first.shown!.vertices).toBe(record.mesh.vertices);
    await page.evaluate(() => {
      const s = document.querySelector('#timeline-slider') as HTMLInputElement;
      s.value = '4';
      s.dispatchEvent(new Event('input'));
    });
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.shown!.extent > 0.3, null, { timeout: 20_000 });
    const last = await state(page);
    expect(last.shown!.extent / first.shown!.extent).toBeCloseTo(Math.exp(0.002 * 400), 2); // uniform exponential growth of lengths
    expect(last.shown!.vertices).toBe(record.growth.refinements.length ? record.growth.refinements.at(-1).to : record.mesh.vertices);
    expect(record.growth.refinements.length).toBeGreaterThan(0);
    expect(await page.textContent('#view-caption')).toMatch(/recorded run · t = 400/);
    await close(page);
  }, 90_000);

  it('a growing scenario grows live: the growth factor, the refinement and the timeline follow it', async () => {
    const page = await open(appUrl);
    await setUpText(page, GROWING);
    const start = await state(page);
    await page.click('#run');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.messages[0]?.includes('finished at t='), null, { timeout: 60_000 });
    const end = await state(page);
    expect(end.time).toBe(400);
    expect(end.frames).toBe(5);
    expect(end.vertices).toBeGreaterThan(start.vertices); // refined once the edges grew by 1.4
    // lengths grow as e^{rt}: the growth factor shown is the square root of the area ratio
    const shown = Number(/growth ×([0-9.]+)/.exec((await page.textContent('#status-growth'))!)![1]);
    expect(shown).toBeCloseTo(Math.exp(0.002 * 400), 2);
    expect(end.shown!.extent / start.shown!.extent).toBeCloseTo(Math.exp(0.002 * 400), 2); // and the surface drawn has grown with it
    await close(page);
  }, 90_000);

  it('the brush follows a growing surface: a dab near the rim of the grown sphere hits it', async () => {
    const page = await open(appUrl);
    await setUpText(page, GROWING.replace(', refine: {edgeGrowth: 1.4}', ''));
    // a dab before the run builds the brush's BVH on the small sphere
    await page.click('#tool-seed');
    const box = (await page.locator('#surface-canvas').boundingBox())!;
    await stroke(page, box.x + box.width / 2, box.y + box.height / 2);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.strokes > 0);
    await page.click('#run');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.messages[0]?.includes('finished at t='), null, { timeout: 60_000 });
    // the rim of the grown sphere on screen, along the middle row of the stage (the colour bar excluded)
    const shot = await stagePixels(page);
    const row = Math.round(shot.png.height / 2);
    let right = 0;
    for (let x = 0; x < shot.png.width - 120; x++) if (drawn(shot.png, row * shot.png.width + x)) right = x;
    const stage = (await page.locator('#stage').boundingBox())!;
    const strokes = (await state(page)).strokes;
    await stroke(page, stage.x + (shot.png.width / 2 + 0.85 * (right - shot.png.width / 2)) * (stage.width / shot.png.width), stage.y + stage.height / 2);
    await page.waitForFunction((n) => (window as unknown as { __placode: AppState }).__placode.strokes > n, strokes, { timeout: 10_000 });
    await close(page);
  }, 90_000);

  it('exports the view as PNG, the coloured mesh as PLY and GLB (valid glTF), and the scenario the command line runs identically', async () => {
    const page = await open(appUrl);
    const small = QUIET.replace('vertices: 2000', 'vertices: 800').replace('end: 100000', 'end: 60') + 'initial: {spots: {count: 3, radius: 0.05, values: {u: 0.5, v: 0.25}}}\n';
    await setUpText(page, small);
    await page.click('#run');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.messages[0]?.includes('finished at t='), null, { timeout: 60_000 });
    await page.click('[data-tab="export-panel"]');
    await page.fill('#png-width', '640');
    await page.fill('#png-height', '480');
    const save = async (button: string) => {
      const [download] = await Promise.all([page.waitForEvent('download'), page.click(button)]);
      const file = join(dir, download.suggestedFilename());
      await download.saveAs(file);
      return readFileSync(file);
    };
    const png = PNG.sync.read(await save('#export-png'));
    expect([png.width, png.height]).toEqual([640, 480]);
    const glb = await save('#export-glb');
    const report = await validator.validateBytes(new Uint8Array(glb));
    expect(report.issues.numErrors).toBe(0);
    const ply = parseMeshFile(new Uint8Array(await save('#export-ply')), 'view.ply');
    const browserV = speciesFromProperties(ply.vertexData).v;
    expect(browserV.length).toBe(ply.mesh.positions.length / 3);
    // the saved scenario, run by the command line, ends where the page ended
    const scenario = await save('#save-scenario');
    writeFileSync(join(dir, 'saved.yaml'), scenario);
    const cli = await runScenarioFile(join(dir, 'saved.yaml'), { out: join(dir, 'saved-run'), progress: 'none', log: () => {} });
    expect(cli.step).toBe(60);
    const final = parseMeshFile(readFileSync(join(dir, 'saved-run', 'final.ply')), 'final.ply');
    const cliV = speciesFromProperties(final.vertexData).v;
    expect(cliV.length).toBe(browserV.length);
    let worst = 0;
    for (let i = 0; i < cliV.length; i++) worst = Math.max(worst, Math.abs(cliV[i] - browserV[i]));
    expect(worst).toBeLessThan(1e-9); // the same solver code in both, so the same numbers
    await close(page);
  }, 120_000);

  it('opens mesh files through the button (OBJ) and by dropping them on the surface (STL): statistics shown, set up on them', async () => {
    const page = await open(appUrl);
    const torus = buildShape({ shape: 'torus', params: { R: 0.3, r: 0.12 }, vertices: 1500 }).mesh;
    const n = torus.positions.length / 3;
    await page.setInputFiles('#open-mesh', { name: 'ring.obj', mimeType: 'text/plain', buffer: Buffer.from(writeObj(torus)) });
    await page.waitForFunction((count) => (window as unknown as { __placode: AppState }).__placode.vertices === count, n, { timeout: 30_000 });
    expect(await page.textContent('#tissue-stats')).toMatch(new RegExp(`^${n} vertices · ${torus.triangles.length / 3} triangles · .* genus 1`));
    expect((await state(page)).messages.some((m) => /opened ring\.obj/.test(m))).toBe(true);
    expect(await page.inputValue('#scenario-text')).toMatch(/file: ring\.obj/);
    // an STL stores every triangle's corners apart: the importer welds them back to the same vertices
    const ball = buildShape({ shape: 'sphere', params: { radius: 0.25 }, vertices: 800 }).mesh;
    const stl = Array.from(writeStl(ball));
    await page.evaluate((bytes) => {
      const data = new DataTransfer();
      data.items.add(new File([new Uint8Array(bytes)], 'ball.stl', { type: 'model/stl' }));
      document.querySelector('#stage')!.dispatchEvent(new DragEvent('drop', { dataTransfer: data, bubbles: true, cancelable: true }));
    }, stl);
    await page.waitForFunction((count) => (window as unknown as { __placode: AppState }).__placode.vertices === count, ball.positions.length / 3, { timeout: 30_000 });
    expect(await page.textContent('#tissue-stats')).toMatch(/genus 0/);
    await close(page);
  }, 90_000);

  it('bad files, bad formulas and impossible parameters each get a message, and the current state stays', async () => {
    const page = await open(appUrl);
    await setUpText(page, QUIET);
    const before = await state(page);
    // a broken PLY through the file button
    await page.setInputFiles('#open-mesh', { name: 'broken.ply', mimeType: 'application/octet-stream', buffer: Buffer.from('ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nend_header\n0\n') });
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.messages[0]?.startsWith('error: broken.ply'));
    // a file that is not a mesh, dropped on the surface
    await page.evaluate(() => {
      const data = new DataTransfer();
      data.items.add(new File(['hello, not a mesh'], 'notes.txt', { type: 'text/plain' }));
      document.querySelector('#stage')!.dispatchEvent(new DragEvent('drop', { dataTransfer: data, bubbles: true, cancelable: true }));
    });
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.messages[0]?.startsWith('error: notes.txt'));
    expect((await state(page)).messages[0]).toMatch(/unknown extension/);
    // a formula with an unbalanced bracket: flagged while typing, refused at set-up
    await page.evaluate(() => { (document.querySelector('#text-section') as HTMLDetailsElement).open = true; });
    await page.click('#use-form');
    await page.selectOption('#mechanism-model', 'own formulas');
    await page.fill('[data-reaction="u"]', 'a - u + u^2*(v');
    expect(await page.textContent('#formula-messages')).toMatch(/du\/dt: .*(parenthesis|bracket|\))/i);
    expect(await page.getAttribute('[data-reaction="u"]', 'class')).toMatch(/invalid/);
    await page.click('#setup');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.problems.length > 0);
    expect(await page.textContent('#problems')).toMatch(/not set up; the current one is unchanged/);
    // an impossible parameter: negative diffusion
    await page.selectOption('#mechanism-model', 'gray-scott');
    await page.fill('[data-diffusion="v"]', '-1e-5');
    await page.click('#setup');
    await page.waitForFunction(() => /diffusion/.test(document.querySelector('#problems')!.textContent ?? ''));
    const after = await state(page);
    expect(after.vertices).toBe(before.vertices);
    expect(after.step).toBe(before.step);
    expect(after.loaded).toBe(true);
    // a number field holding words: flagged at the field, written as the words (never .nan), refused by name
    await page.fill('[data-diffusion="v"]', '1e-5');
    await page.selectOption('#growth-law', 'uniform');
    await page.fill('#growth-rate', 'fast');
    expect(await page.getAttribute('#growth-rate', 'class')).toMatch(/invalid/);
    expect(await page.textContent('#formula-messages')).toContain('growth rate: a number, not "fast"');
    const yaml = await page.inputValue('#scenario-text');
    expect(yaml).not.toMatch(/nan/i);
    expect(yaml).toMatch(/rate: fast/);
    await page.click('#setup');
    await page.waitForFunction(() => /growth\.rate/.test(document.querySelector('#problems')!.textContent ?? ''));
    expect((await state(page)).vertices).toBe(before.vertices);
    await close(page);
  }, 120_000);
});
