import { expect } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { launchChromium } from './browser.ts';
import { ensureViewerBuilt } from '../../solver/cli/viewerBuild.ts';
import { startViewServer } from '../../solver/cli/viewServer.ts';
import { runScenarioFile } from '../../solver/run/runScenarioFile.ts';

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

/** Two viewer servers (on their own, and on a run directory) and Chromium, for a test file's beforeAll. */
export interface Viewers {
  browser: Browser;
  /** the page with no run directory */
  appUrl: string;
  /** the page serving the run directory `runName` */
  runUrl: string;
  /** a temporary directory holding the run (and whatever the tests write there) */
  dir: string;
  stop(): Promise<void>;
}

/**
 * Build the viewer, run `scenario` into `dir/runName` with the command line's own run loop, serve the
 * page twice (without and with that run) and launch Chromium; `stop` closes them and removes `dir`.
 */
export async function startViewers(scenario: string, runName: string): Promise<Viewers> {
  const dir = mkdtempSync(join(tmpdir(), `placode-${runName}-`));
  const appDir = await ensureViewerBuilt();
  writeFileSync(join(dir, `${runName}.yaml`), scenario);
  const run = await runScenarioFile(join(dir, `${runName}.yaml`), { out: join(dir, runName), progress: 'none', log: () => {} });
  expect(run.reason).toBe('end');
  const a = await startViewServer({ appDir, port: 0 });
  const b = await startViewServer({ appDir, runDir: join(dir, runName), port: 0 });
  const browser = await launchChromium();
  return {
    browser, appUrl: a.url, runUrl: b.url, dir,
    async stop() {
      await browser.close();
      a.server.close();
      b.server.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
