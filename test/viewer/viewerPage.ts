import { expect } from 'vitest';
import type { Browser, Page } from 'playwright-core';

/** What the page exposes as window.__placode (see viewer/src/app.ts). */
export interface AppState {
  ready: boolean; loaded: boolean; running: boolean; step: number; time: number; vertices: number; frames: number; view: string; problems: string[]; messages: string[];
  shown: { species: string; min: number; mean: number; max: number; vertices: number; extent: number; time: number; range: [number, number] } | null;
  serverRun: { name: string; frames: number } | null;
  strokes: number;
  stepsPerSecond: number;
  threads: number;
  paints: number;
  webgl: { renderer: string; antialias: boolean } | null;
}

export const state = (page: Page) => page.evaluate(() => (window as unknown as { __placode: AppState }).__placode) as Promise<AppState>;

const pageErrors = new Map<Page, string[]>();

/** Close a page; it must not have thrown anything along the way. */
export async function close(page: Page): Promise<void> {
  await page.close();
  expect(pageErrors.get(page)).toEqual([]);
}

/**
 * Open the page; unless it shows a run directory (`withRun`), wait for the
 * form's own scenario to be set up first. `beforeLoad` runs in the page before
 * its own scripts (observers a test installs).
 */
export async function open(browser: Browser, url: string, withRun = false, beforeLoad?: () => void): Promise<Page> {
  const page = await browser.newPage({ viewport: { width: 1280, height: 860 }, acceptDownloads: true });
  const errors: string[] = [];
  pageErrors.set(page, errors);
  page.on('pageerror', (e) => errors.push(e.message));
  if (beforeLoad) await page.addInitScript(beforeLoad);
  // the form's own scenario (Gray–Scott on a small sphere), not the example the viewer opens on, unless the url names one
  await page.goto(withRun || /[?&]example=/.test(url) ? url : `${url}${url.includes('?') ? '&' : '?'}example=`);
  await page.waitForFunction((run) => {
    const a = (window as unknown as { __placode: AppState }).__placode;
    return a?.ready && (run || a.loaded);
  }, withRun, { timeout: 60_000 });
  return page;
}

/** Set up a scenario from text, as a user pasting it would. */
export async function setUpText(page: Page, text: string): Promise<void> {
  await page.evaluate(() => { (document.querySelector('#text-section') as HTMLDetailsElement).open = true; });
  await page.fill('#scenario-text', text);
  const before = (await state(page)).messages.length;
  await page.click('#use-text');
  await page.waitForFunction((n) => {
    const a = (window as unknown as { __placode: AppState }).__placode;
    return a.messages.length > n && a.messages.some((m, i) => i < a.messages.length - n && m.startsWith('info: set up'));
  }, before, { timeout: 60_000 });
}
