import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { PNG } from 'pngjs';
import { haveChromium } from './browser.ts';
import { close, open as openPage, setUpText, startViewers, state, type AppState, type Viewers } from './viewerPage.ts';
import { colormapTable } from '../../solver/io/colormap.ts';

let dir = '';
let browser: Browser;
let appUrl = '';
let runUrl = '';

/** A small run for the run-directory page: Gray–Scott on a sphere, 4 frames. */
const RUN = `
seed: 3
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 600}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 3, radius: 0.08, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 300}
output: {every: 100, colour: v, colormap: viridis}
analysis: {modes: 0}
`;

/** Gray–Scott with no Turing band: spots only from large local disturbances. */
const QUIET = `
seed: 1
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 1500}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 2, radius: 0.06, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 100000}
output: {every: 50, colour: v}
`;

let viewers: Viewers | undefined;
beforeAll(async () => {
  if (!haveChromium) return;
  viewers = await startViewers(RUN, 'spots-run');
  ({ browser, appUrl, runUrl, dir } = viewers);
}, 120_000);

afterAll(async () => {
  await viewers?.stop();
});

const app = (page: Page) => state(page);
const messagesLike = async (page: Page, pattern: RegExp) => (await app(page)).messages.filter((m) => pattern.test(m)).length;

/** A stroke of many pointer moves across the middle of the surface. */
async function longStroke(page: Page) {
  const box = (await page.locator('#stage').boundingBox())!;
  const x = box.x + box.width / 2 - 40, y = box.y + box.height / 2;
  await page.mouse.move(x, y);
  await page.mouse.down();
  await page.mouse.move(x + 80, y + 20, { steps: 25 });
  await page.mouse.up();
}

describe.skipIf(!haveChromium)('the viewer guides and tells the truth (Chromium)', () => {
  it('opens on the growing limb-bud example: the form shows it, the guide points at Start, the header carries no throughput', async () => {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(appUrl);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode?.loaded, null, { timeout: 60_000 });
    expect(await page.inputValue('#example')).toMatch(/limb-paddle-growing\.yaml$/);
    // the menu offers the examples the page can set up by itself (not those reading stage meshes from files)
    const offered = await page.evaluate(() => [...document.querySelectorAll('#example option')].map((o) => o.textContent));
    expect(offered).toContain('sphere-spots');
    expect(offered).not.toContain('limb-bud-stages');
    expect(await page.inputValue('#tissue-shape')).toBe('limb-bud');
    expect(await page.inputValue('#mechanism-model')).toBe('gierer-meinhardt');
    expect(await page.inputValue('#growth-law')).toBe('anisotropic');
    // what the form cannot hold is named, and the text runs
    expect(await page.textContent('#text-mode-note')).toMatch(/growth\.centre/);
    expect(await page.isDisabled('#tissue-shape')).toBe(true);
    // the first steps: tissue and mechanism done, set up done, Start next
    expect(await page.getAttribute('#guide [data-step="start"]', 'class')).toMatch(/current/);
    expect(await page.getAttribute('#guide [data-step="tissue"]', 'class')).toMatch(/done/);
    // throughput is a detail beside the transport, not a header figure
    expect(await page.textContent('#masthead')).not.toMatch(/steps\/s|paused/);
    expect(await page.locator('#transport #status-rate').count()).toBe(1);
    expect(await page.textContent('#tool-seed')).toBe('Induce');
    expect(errors).toEqual([]);
    await page.close();
  }, 90_000);

  it('Start before anything is set up says so at the transport bar; a brush error is said once at the toolbar however long the stroke', async () => {
    const page = await openPage(browser, runUrl, true); // a run directory: nothing set up to simulate
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.serverRun !== null, null, { timeout: 30_000 });
    expect((await app(page)).loaded).toBe(false);
    await page.click('#run');
    expect(await page.isVisible('#transport-notice')).toBe(true);
    expect(await page.textContent('#transport-notice')).toMatch(/Nothing to start yet: .*press “Set up”/);
    await page.click('#tool-seed');
    await longStroke(page);
    await longStroke(page);
    expect(await page.isVisible('#toolbar-notice')).toBe(true);
    expect(await page.textContent('#toolbar-notice')).toMatch(/brushes act on a set-up tissue/);
    expect(await messagesLike(page, /brushes act on a set-up tissue/)).toBe(1);
    await close(page);
  }, 90_000);

  it('a run directory opens as that run: its scenario in the form, the slider at frame 1 beside its label, the status line describing it', async () => {
    const page = await openPage(browser, runUrl, true);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.serverRun !== null, null, { timeout: 30_000 });
    const s = await app(page);
    expect(await page.inputValue('#timeline-slider')).toBe('0');
    expect(await page.textContent('#timeline-label')).toMatch(/^frame 1 of 4, t = 0$/);
    expect(await page.textContent('#status-state')).toBe('recorded run spots-run');
    expect(await page.textContent('#status-vertices')).toBe(`${s.shown!.vertices} vertices`);
    expect(await page.textContent('#status-steps')).toBe('frame 1 of 4');
    // the form shows the run's scenario: its sphere, its model and its parameters
    expect(await page.inputValue('#tissue-shape')).toBe('sphere');
    expect(await page.inputValue('#shape-params [data-param="radius"]')).toBe('0.25');
    expect(await page.inputValue('[data-param="F"]')).toBe('0.03');
    expect(await page.inputValue('#scenario-text')).toContain('colormap: viridis');
    // scrubbing moves slider, label and status together
    await page.evaluate(() => {
      const slider = document.querySelector('#timeline-slider') as HTMLInputElement;
      slider.value = '3';
      slider.dispatchEvent(new Event('input'));
    });
    await page.waitForFunction(() => /frame 4 of 4/.test(document.querySelector('#timeline-label')!.textContent ?? ''));
    expect(await page.textContent('#status-steps')).toBe('frame 4 of 4');
    expect(await page.textContent('#status-time')).toBe('t = 300');
    await close(page);
  }, 90_000);

  it('own formulas keep their parameter list and its “+ parameter” button, and the default formulas set up', async () => {
    const page = await openPage(browser, appUrl);
    await page.selectOption('#mechanism-model', 'own formulas');
    expect(await page.locator('#mechanism-params [data-param="a"]').count()).toBe(1);
    expect(await page.locator('#mechanism-params [data-param="b"]').count()).toBe(1);
    expect(await page.locator('#add-parameter').count()).toBe(1);
    expect(await page.textContent('#formula-messages')).toBe('');
    const before = (await app(page)).messages.length;
    await page.click('#setup');
    await page.waitForFunction((n) => (window as unknown as { __placode: AppState }).__placode.messages.slice(0, (window as unknown as { __placode: AppState }).__placode.messages.length - n).some((m) => m.startsWith('info: set up: u, v')), before, { timeout: 60_000 });
    expect((await app(page)).problems).toEqual([]);
    await close(page);
  }, 90_000);

  it('Stability: with no band, a sentence says a pattern may still form from large disturbances; the plot uses σ and stays inside its pane', async () => {
    const page = await openPage(browser, appUrl);
    await setUpText(page, QUIET);
    await page.waitForFunction(() => /A pattern can still form/.test(document.querySelector('#stability-summary')?.textContent ?? ''), null, { timeout: 60_000 });
    expect(await page.textContent('#stability-summary')).toMatch(/finite-amplitude/);
    expect(await page.textContent('#dispersion-plot')).toMatch(/σ \(growth of a perturbation\)/);
    const outside = await page.evaluate(() => {
      const pane = document.querySelector('#stability-panel')!.getBoundingClientRect();
      return [...document.querySelectorAll('#dispersion-plot text')].map((t) => t.getBoundingClientRect()).filter((r) => r.left < pane.left - 0.5 || r.right > pane.right + 0.5 || r.top < pane.top - 0.5 || r.bottom > pane.bottom + 0.5).length;
    });
    expect(outside).toBe(0);
    await close(page);
  }, 90_000);

  it('a field that hardly varies is not stretched over the whole colour map, and the caption says how little it varies', async () => {
    const page = await openPage(browser, appUrl);
    await setUpText(page, QUIET.replace(/initial: .*\n/, 'initial: {noise: 0.0003}\n').replace('colour: v', 'colour: u'));
    const s = await app(page);
    // u = 1 ± 0.0003: spread 0.06 % of its size; the range spans at least 1 %
    expect((s.shown!.max - s.shown!.min) / s.shown!.max).toBeLessThan(0.001);
    expect(s.shown!.range[1] - s.shown!.range[0]).toBeGreaterThanOrEqual(0.0099 * s.shown!.max);
    expect(await page.textContent('#view-caption')).toMatch(/u varies by 0\.0\d+ % of its size: no pattern yet/);
    await close(page);
  }, 90_000);

  it('lengths and wavelengths carry the mesh\'s unit: the tissue statistics and the Stability tab', async () => {
    const page = await openPage(browser, appUrl);
    await setUpText(page, `
mesh: {shape: sphere, params: {radius: 250}, vertices: 1500, units: µm}
kinetics: {model: schnakenberg, parameters: {gamma: 1}}
diffusion: {u: 1, v: 20}
time: {scheme: imex, end: 10}
`);
    expect(await page.textContent('#tissue-stats')).toMatch(/area [\d.e+]+ µm² .* mean edge [\d.]+ µm/);
    await page.waitForFunction(() => /wavelength/.test(document.querySelector('#stability-summary')?.textContent ?? ''), null, { timeout: 60_000 });
    expect(await page.textContent('#stability-summary')).toMatch(/1\/µm², fastest k² = [\d.e+-]+ 1\/µm² \(wavelength 2π\/k = [\d.e+-]+ µm/);
    expect(await page.textContent('#dispersion-plot')).toContain('k² (surface eigenvalue λ, 1/µm²)');
    await close(page);
  }, 90_000);

  it('the exported PNG carries the colour bar in the colormap\'s own colours (whole-pixel scale, opaque)', async () => {
    const page = await openPage(browser, appUrl);
    await setUpText(page, QUIET);
    await page.click('[data-tab="export-panel"]');
    await page.fill('#png-width', '1600');
    await page.fill('#png-height', '1200');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
    const file = join(dir, 'view.png');
    await download.saveAs(file);
    const png = PNG.sync.read(readFileSync(file));
    // the bar as drawColorBar lays it out at scale round(1200 / 700) = 2: 172 × 520 px, bar 32 px wide from x = 16, rows 52 … 496
    const scale = 2, barW = 86 * scale, barH = 260 * scale;
    const x0 = Math.round(1600 - barW - 10 * scale), y0 = Math.round((1200 - barH) / 2);
    const at = (x: number, y: number) => Array.from(png.data.subarray(4 * (y * png.width + x), 4 * (y * png.width + x) + 3));
    const cx = x0 + 8 * scale + 8 * scale;
    const lut = colormapTable('viridis');
    const top = at(cx, y0 + 26 * scale + 1), bottom = at(cx, y0 + barH - 12 * scale - 2);
    const near = (a: number[], b: number[]) => Math.max(...a.map((v, i) => Math.abs(v - b[i])));
    expect(near(top, [lut[3 * 255], lut[3 * 255 + 1], lut[3 * 255 + 2]])).toBeLessThanOrEqual(6);
    expect(near(bottom, [lut[0], lut[1], lut[2]])).toBeLessThanOrEqual(6);
    // the bar's background is opaque white, whatever the surface behind it
    expect(at(x0 + 2, y0 + barH / 2)).toEqual([255, 255, 255]);
    await close(page);
  }, 90_000);
});
