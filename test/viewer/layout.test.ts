import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { haveChromium } from './browser.ts';
import { startViewers, type AppState, type Viewers } from './viewerPage.ts';

let browser: Browser;
let appUrl = '';
let runUrl = '';

/** A short recorded run for the scrubbing part of a session: Gray–Scott on a small sphere, 3 frames. */
const RUN = `
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 500}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 2, radius: 0.08, values: {u: 0.5, v: 0.25}}}
time: {scheme: imex, step: 1, end: 200}
output: {every: 100}
analysis: {modes: 0}
`;

let viewers: Viewers | undefined;
beforeAll(async () => {
  if (!haveChromium) return;
  viewers = await startViewers(RUN, 'run');
  ({ browser, appUrl, runUrl } = viewers);
}, 120_000);

afterAll(async () => {
  await viewers?.stop();
});

/** A page at a window size that records every console error and uncaught exception. */
async function openAt(url: string, width: number, height: number): Promise<{ page: Page; errors: string[] }> {
  const page = await browser.newPage({ viewport: { width, height }, acceptDownloads: true });
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(`uncaught: ${e.message}`));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(`console: ${m.text()}`); });
  await page.goto(url);
  return { page, errors };
}

const placode = (page: Page) => page.evaluate(() => (window as unknown as { __placode: AppState }).__placode);

/**
 * What a person sees of the controls: those drawn on top at their centre (a control scrolled under the
 * form's sticky bar, or out of its panel, is not seen and not counted), with their boxes.
 */
function seenControls(page: Page) {
  return page.evaluate(() => {
    const out: { name: string; left: number; top: number; right: number; bottom: number }[] = [];
    for (const e of document.querySelectorAll<HTMLElement>('button, input:not([type=file]), select, textarea, summary, label.file-button, #guide li')) {
      const r = e.getBoundingClientRect();
      if (r.width === 0 || r.height === 0 || e.closest('[hidden]')) continue;
      const top = document.elementFromPoint(r.left + r.width / 2, r.top + r.height / 2);
      if (!top || !(top === e || e.contains(top) || top.contains(e) || (top as HTMLLabelElement).control === e)) continue;
      out.push({ name: e.id || `${e.tagName.toLowerCase()} “${(e.textContent ?? '').trim().slice(0, 24)}”`, left: r.left, top: r.top, right: r.right, bottom: r.bottom });
    }
    return out;
  });
}

/** WCAG 2.1 contrast of every visible text against what is behind it (alpha layers composited). */
function contrastFailures(page: Page) {
  return page.evaluate(() => {
    const parse = (c: string) => (c.match(/[\d.]+/g) ?? []).map(Number);
    const lin = (v: number) => { const x = v / 255; return x <= 0.03928 ? x / 12.92 : ((x + 0.055) / 1.055) ** 2.4; };
    const lum = ([r, g, b]: number[]) => 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
    const background = (e: Element | null): number[] => {
      const layers: number[][] = [];
      for (let n = e; n; n = n.parentElement) {
        const c = parse(getComputedStyle(n).backgroundColor);
        const a = c.length > 3 ? c[3] : 1;
        if (a > 0) layers.push([c[0], c[1], c[2], a]);
        if (a >= 1) break;
      }
      let out = [255, 255, 255];
      for (const [r, g, b, a] of layers.reverse()) out = [r * a + out[0] * (1 - a), g * a + out[1] * (1 - a), b * a + out[2] * (1 - a)];
      return out;
    };
    const fails: string[] = [];
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    const seen = new Set<Element>();
    for (let t = walker.nextNode(); t; t = walker.nextNode()) {
      const e = t.parentElement;
      if (!e || seen.has(e) || !(t.textContent ?? '').trim() || e.closest('svg, [hidden], option, script, style')) continue;
      seen.add(e);
      const r = e.getBoundingClientRect();
      if (r.width === 0 || r.height === 0) continue;
      if ((e as HTMLButtonElement).disabled || e.closest(':disabled')) continue; // inactive controls are exempt (WCAG 1.4.3)
      const s = getComputedStyle(e);
      if (s.visibility === 'hidden' || Number(s.opacity) === 0) continue;
      const fg = parse(s.color), bg = background(e);
      const alpha = fg.length > 3 ? fg[3] : 1;
      const ink = [0, 1, 2].map((k) => fg[k] * alpha + bg[k] * (1 - alpha));
      const [hi, lo] = [lum(ink), lum(bg)].sort((a, b) => b - a);
      const ratio = (hi + 0.05) / (lo + 0.05);
      const size = parseFloat(s.fontSize), bold = Number(s.fontWeight) >= 700;
      const needed = size >= 24 || (size >= 18.66 && bold) ? 3 : 4.5;
      if (ratio < needed) fails.push(`“${(t.textContent ?? '').trim().slice(0, 30)}” ${s.color} on rgb(${bg.map(Math.round)}) = ${ratio.toFixed(2)}`);
    }
    return { checked: seen.size, fails };
  });
}

const SIZES: [number, number][] = [[1024, 768], [1440, 900], [1920, 1080]];

describe.skipIf(!haveChromium)('the viewer\'s layout at three window sizes (Chromium)', () => {
  for (const [width, height] of SIZES) {
    it(`${width}×${height}: no two controls overlap, nothing spills sideways, the plot's labels are inside its pane, text passes WCAG AA, Tab reaches every control`, async () => {
      const { page, errors } = await openAt(appUrl, width, height);
      await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode?.loaded, null, { timeout: 60_000 });
      await page.waitForFunction(() => document.querySelectorAll('#dispersion-plot .mode-mark').length > 0, null, { timeout: 60_000 });
      const controls = await seenControls(page);
      expect(controls.length).toBeGreaterThan(20);
      const overlaps: string[] = [];
      for (let i = 0; i < controls.length; i++) for (let j = i + 1; j < controls.length; j++) {
        const a = controls[i], b = controls[j];
        const w = Math.min(a.right, b.right) - Math.max(a.left, b.left), h = Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top);
        if (w > 1 && h > 1) overlaps.push(`${a.name} × ${b.name}`);
      }
      expect(overlaps).toEqual([]);
      for (const c of controls) {
        expect(c.left, c.name).toBeGreaterThanOrEqual(-0.5);
        expect(c.right, c.name).toBeLessThanOrEqual(width + 0.5);
      }
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);
      // the stability plot: every label and tick inside the pane and inside the drawing
      const outside = await page.evaluate(() => {
        const pane = document.querySelector('#stability-panel')!.getBoundingClientRect();
        const plot = document.querySelector('#dispersion-plot')!.getBoundingClientRect();
        return [...document.querySelectorAll('#dispersion-plot text')].map((t) => ({ text: t.textContent, r: t.getBoundingClientRect() }))
          .filter(({ r }) => r.left < Math.max(pane.left, plot.left) - 0.5 || r.right > Math.min(pane.right, plot.right) + 0.5 || r.top < Math.max(pane.top, plot.top) - 0.5 || r.bottom > Math.min(pane.bottom, plot.bottom) + 0.5)
          .map(({ text }) => text);
      });
      expect(outside).toEqual([]);
      // the type and the actions: body text at 14 px or more, Start (primary, filled) unlike Set up (secondary,
      // outlined), the form's sticky bar opaque and over the rows scrolled under it, the kinetics menu's choice
      // shown whole
      const look = await page.evaluate(() => {
        const style = (sel: string) => getComputedStyle(document.querySelector(sel)!);
        const bar = document.querySelector('.side-bottom')!.getBoundingClientRect();
        const atBar = document.elementFromPoint(bar.left + 4, bar.top + 4);
        const select = document.querySelector('#mechanism-model') as HTMLSelectElement;
        const g = document.createElement('canvas').getContext('2d')!;
        g.font = `${style('#mechanism-model').fontSize} ${style('#mechanism-model').fontFamily}`;
        const textWidth = g.measureText(select.selectedOptions[0].textContent ?? '').width;
        return {
          body: parseFloat(style('body').fontSize),
          start: style('#run').backgroundColor, setUp: style('#setup').backgroundColor,
          barBackground: style('.side-bottom').backgroundColor, barOnTop: !!atBar?.closest('.side-bottom'),
          menuFits: textWidth <= select.clientWidth - 20,
        };
      });
      expect(look.body).toBeGreaterThanOrEqual(14);
      expect(look.start).not.toBe(look.setUp);
      expect(look.barBackground).toMatch(/^rgb\(/); // opaque
      expect(look.barOnTop).toBe(true);
      expect(look.menuFits).toBe(true);
      const contrast = await contrastFailures(page);
      expect(contrast.checked).toBeGreaterThan(40);
      expect(contrast.fails).toEqual([]);
      // keyboard: Tab visits every enabled control that is shown (the form's fields are disabled while the text runs)
      const wanted = await page.evaluate(() => [...document.querySelectorAll<HTMLElement>('button, input, select, textarea, summary, [tabindex="0"]')]
        .filter((e) => !(e as HTMLInputElement).disabled && !e.closest('[hidden]') && e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden' && !e.closest('details:not([open]) > :not(summary)'))
        .map((e, k) => { e.dataset.focusProbe = String(k); return k; }));
      const reached = new Set<string>();
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      for (let k = 0; k < wanted.length + 20; k++) {
        await page.keyboard.press('Tab');
        const probe = await page.evaluate(() => (document.activeElement as HTMLElement | null)?.dataset.focusProbe);
        if (probe !== undefined) reached.add(probe);
      }
      const missed = await page.evaluate((got) => [...document.querySelectorAll<HTMLElement>('[data-focus-probe]')].filter((e) => !got.includes(e.dataset.focusProbe!)).map((e) => e.id || e.outerHTML.slice(0, 60)), [...reached]);
      expect(missed).toEqual([]);
      expect(errors).toEqual([]);
      await page.close();
    }, 120_000);
  }

  it('a whole session — load, set up, run, brush, stability, scrub a run, export — logs no console error and throws nothing', async () => {
    const { page, errors } = await openAt(`${appUrl}?example=`, 1440, 900);
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode?.loaded, null, { timeout: 60_000 });
    await page.fill('#tissue-vertices', '1500');
    await page.click('#setup');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.vertices < 2000, null, { timeout: 60_000 });
    await page.click('#run');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.step >= 50, null, { timeout: 60_000 });
    await page.click('#run');
    await page.waitForFunction(() => !(window as unknown as { __placode: AppState }).__placode.running);
    await page.click('#tool-seed');
    const box = (await page.locator('#stage').boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width / 2 + 30, box.y + box.height / 2 + 10, { steps: 6 });
    await page.mouse.up();
    expect((await placode(page)).strokes).toBeGreaterThan(0);
    await page.click('#tool-off');
    await page.click('[data-tab="stability-panel"]');
    await page.waitForFunction(() => document.querySelectorAll('#dispersion-plot .mode-mark').length > 2, null, { timeout: 60_000 });
    await page.focus('#dispersion-plot .mode-mark[data-mode="2"]'); // marks crowd: chosen by keyboard
    await page.keyboard.press('Enter');
    await page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode.view === 'mode');
    await page.click('#show-live');
    await page.click('[data-tab="timeline-panel"]');
    await page.evaluate(() => {
      const s = document.querySelector('#timeline-slider') as HTMLInputElement;
      s.value = '0';
      s.dispatchEvent(new Event('input'));
    });
    await page.click('[data-tab="export-panel"]');
    await page.fill('#png-width', '320');
    await page.fill('#png-height', '240');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
    expect(download.suggestedFilename()).toBe('placode-view.png');
    await page.close();
    // and a recorded run, scrubbed
    const run = await openAt(runUrl, 1440, 900);
    await run.page.waitForFunction(() => (window as unknown as { __placode: AppState }).__placode?.serverRun !== null, null, { timeout: 60_000 });
    await run.page.evaluate(() => {
      const s = document.querySelector('#timeline-slider') as HTMLInputElement;
      s.value = '2';
      s.dispatchEvent(new Event('input'));
    });
    await run.page.waitForFunction(() => /frame 3 of 3/.test(document.querySelector('#timeline-label')!.textContent ?? ''));
    await run.page.close();
    expect([...errors, ...run.errors]).toEqual([]);
  }, 180_000);
});
