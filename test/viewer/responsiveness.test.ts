import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Server } from 'node:http';
import type { Browser } from 'playwright-core';
import { haveChromium, launchChromium } from './browser.ts';
import { close, open, setUpText, state } from './viewerPage.ts';
import { startViewServer } from '../../solver/cli/viewServer.ts';
import { ensureViewerBuilt } from '../../solver/cli/viewerBuild.ts';
import { VIEWER_PAINT_INTERVAL_MS, VIEWER_RATE_WINDOW_MS } from '../../solver/defaults.ts';

let browser: Browser;
let server: Server | undefined;
let url = '';

/** Gray–Scott, implicit–explicit with CG, on about 6000 vertices, seeded with spots so every step has CG work. */
const RUNNING = `
seed: 3
mesh: {shape: sphere, params: {radius: 0.5}, vertices: 6000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 8, radius: 0.08, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 10000000, solver: cg}
output: {every: 500, colour: v}
analysis: {modes: 0}
`;

beforeAll(async () => {
  if (!haveChromium) return;
  const appDir = await ensureViewerBuilt();
  const s = await startViewServer({ appDir, port: 0 });
  server = s.server;
  url = s.url;
  browser = await launchChromium();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  server?.close();
});

/** Installed before the page's scripts: the main thread's long tasks (> 50 ms), summed, the latency of clicks on the tabs, and the step the page shows at every animation frame. */
function observe() {
  const w = window as unknown as { __longTaskMs: number; __clicks: number[]; __steps: [number, number][]; __placode?: { running: boolean; step: number } };
  w.__longTaskMs = 0;
  w.__clicks = [];
  w.__steps = [];
  const record = (now: number) => {
    if (w.__placode?.running) w.__steps.push([now, w.__placode.step]);
    requestAnimationFrame(record);
  };
  requestAnimationFrame(record);
  new PerformanceObserver((list) => { for (const e of list.getEntries()) w.__longTaskMs += e.duration; }).observe({ type: 'longtask', buffered: true });
  // a click is answered when the frame after its handler starts: from the input's own time stamp (input delay included)
  document.addEventListener('click', (e) => {
    if (!(e.target as Element).closest?.('.tabs button')) return;
    const start = e.timeStamp;
    requestAnimationFrame(() => w.__clicks.push(performance.now() - start));
  }, true);
}

describe.skipIf(!haveChromium)('the viewer stays responsive while a simulation runs (Chromium, software WebGL)', () => {
  it('6k vertices, IMEX-CG: long tasks take < 30 % of the page\'s time, tab clicks are answered in < 100 ms (median), the steps per second shown match the steps counted', async () => {
    const page = await open(browser, url, false, observe);
    const webgl = (await state(page)).webgl!;
    expect(webgl.renderer).toMatch(/swiftshader/i);
    expect(webgl.antialias).toBe(false); // software WebGL: drawn without antialiasing
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(true); // COOP + COEP: threads can share memory here
    await setUpText(page, RUNNING);
    expect((await state(page)).vertices).toBeGreaterThan(5500);
    await page.click('#run');
    // running and painted a few times: the measured window starts here
    await page.waitForFunction(() => { const a = (window as unknown as { __placode: { running: boolean; paints: number; stepsPerSecond: number } }).__placode; return a.running && a.paints > 5 && a.stepsPerSecond > 0; }, null, { timeout: 60_000 });
    // the step history covers a rate window (and a little) before the first sample
    await page.waitForFunction((span) => { const h = (window as unknown as { __steps: [number, number][] }).__steps; return h.length > 1 && h[h.length - 1][0] - h[0][0] > span; }, VIEWER_RATE_WINDOW_MS * 1.5, { timeout: 60_000 });
    const sample = () => page.evaluate(() => {
      const w = window as unknown as { __placode: { step: number; stepsPerSecond: number; paints: number; paintIntervalMs: number }; __longTaskMs: number };
      return { now: performance.now(), step: w.__placode.step, rate: w.__placode.stepsPerSecond, paints: w.__placode.paints, interval: w.__placode.paintIntervalMs, longTaskMs: w.__longTaskMs, shown: document.querySelector('#status-rate')!.textContent ?? '' };
    });
    const first = await sample();
    const rates: number[] = [];
    const intervals: number[] = [first.interval];
    const tabs = ['timeline-panel', 'export-panel', 'messages-panel', 'stability-panel'];
    for (let k = 0; k < 20; k++) {
      await page.click(`.tabs button[data-tab="${tabs[k % tabs.length]}"]`);
      await page.waitForFunction((n) => (window as unknown as { __clicks: number[] }).__clicks.length > n, k); // answered (the frame after it began)
      expect(await page.isVisible(`#${tabs[k % tabs.length]}`)).toBe(true);
      const now = await sample();
      rates.push(now.rate);
      intervals.push(now.interval);
      await page.waitForTimeout(250); // a user's pace between clicks
    }
    const last = await sample();
    const wall = last.now - first.now;
    const clicks = (await page.evaluate(() => (window as unknown as { __clicks: number[] }).__clicks)).slice().sort((a, b) => a - b);
    const median = clicks[Math.floor(clicks.length / 2)];
    const longShare = (last.longTaskMs - first.longTaskMs) / wall;
    // The figure shown at time t is the worker's count over a window of VIEWER_RATE_WINDOW_MS that ended
    // between t − VIEWER_RATE_WINDOW_MS and t: on average it describes the steps around t − VIEWER_RATE_WINDOW_MS.
    // So its mean over the samples is set against the steps the page saw arrive over the window shifted back by
    // that much (the machine's load, and with it the rate, may change while the test runs).
    const history = await page.evaluate(() => (window as unknown as { __steps: [number, number][] }).__steps);
    const stepAt = (t: number) => {
      let k = history.findIndex(([now]) => now >= t);
      if (k < 0) k = history.length - 1;
      if (k === 0) k = 1;
      const [t0, s0] = history[k - 1], [t1, s1] = history[k];
      return s0 + ((s1 - s0) * (t - t0)) / Math.max(t1 - t0, 1e-9);
    };
    const counted = ((stepAt(last.now - VIEWER_RATE_WINDOW_MS) - stepAt(first.now - VIEWER_RATE_WINDOW_MS)) * 1000) / wall;
    const shownMean = rates.reduce((a, b) => a + b, 0) / rates.length;
    const paintsPerSecond = ((last.paints - first.paints) * 1000) / wall;
    console.log(`viewer while running: ${(100 * longShare).toFixed(1)} % of ${(wall / 1000).toFixed(1)} s in long tasks, tab clicks answered in ${clicks.map((c) => c.toFixed(0)).join(', ')} ms (median ${median.toFixed(0)}), ${counted.toFixed(0)} steps/s counted, ${shownMean.toFixed(0)} shown, ${paintsPerSecond.toFixed(1)} paints/s, ${(await state(page)).threads} simulation thread(s)`);
    expect(longShare).toBeLessThan(0.3);
    expect(median).toBeLessThan(100);
    expect(Math.abs(shownMean - counted) / counted).toBeLessThan(0.1);
    expect(last.shown).toMatch(/^[0-9.]+(e[+-]?\d+)? steps\/s$/);
    // painted no more often than every VIEWER_PAINT_INTERVAL_MS (a little slack for timer rounding)
    expect(paintsPerSecond).toBeLessThan(1.1 * (1000 / VIEWER_PAINT_INTERVAL_MS));
    // and not much less often than the pacer allows: it waits its interval (longer where drawing is slow —
    // software WebGL on a busy machine), then a frame, then the paint and the worker's next state, so a paint
    // at least every two intervals and a half is the floor whatever the machine
    const longest = Math.max(...intervals);
    expect(paintsPerSecond).toBeGreaterThan(1000 / (2.5 * longest));
    await page.click('#run');
    await close(page);
  }, 180_000);

  it('the page steps on two threads where the scenario asks for them, with the same numbers as on one', async () => {
    const page = await open(browser, url);
    const shown: unknown[] = [];
    for (const threads of [2, 1]) {
      // 40 000 vertices: enough rows for two threads
      await setUpText(page, RUNNING.replace('vertices: 6000', 'vertices: 40000').replace('solver: cg}', `solver: cg, threads: ${threads}}`));
      expect((await state(page)).threads).toBe(threads);
      expect(await page.textContent('#clock-stats')).toMatch(new RegExp(`, ${threads} threads?$`));
      await page.fill('#step-count', '1');
      for (let k = 1; k <= 12; k++) {
        await page.click('#step');
        await page.waitForFunction((n) => (window as unknown as { __placode: { step: number } }).__placode.step >= n, k);
      }
      // the painted frame is the twelfth step's (painting is paced: on a busy machine it trails the steps)
      await page.waitForFunction(() => { const a = (window as unknown as { __placode: { time: number; shown: { time: number } | null } }).__placode; return a.shown !== null && a.shown.time === a.time; }, null, { timeout: 60_000 });
      expect((await state(page)).time).toBe(12);
      shown.push((await state(page)).shown);
    }
    expect(shown[0]).toEqual(shown[1]); // min, mean and max of v after 12 steps, to the bit
    await close(page);
  }, 180_000);
});
