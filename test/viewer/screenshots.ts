/**
 * The viewer's look, for review with each change: `npm run screenshots` writes
 * viewer/docs/first-screen.png (what `placode view` opens on), running.png (the
 * growing limb-bud example some way into its run) and stability.png (its
 * Stability tab), at 1440×900 in headless Chromium.
 */
import { join } from 'node:path';
import { launchChromium } from './browser.ts';
import { ensureViewerBuilt, VIEWER_DIR } from '../../solver/cli/viewerBuild.ts';
import { startViewServer } from '../../solver/cli/viewServer.ts';

const out = join(VIEWER_DIR, 'docs');
const appDir = await ensureViewerBuilt((line) => console.log(line));
const { server, url } = await startViewServer({ appDir, port: 0 });
const browser = await launchChromium();
try {
  const page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
  await page.goto(url);
  type Placode = { loaded: boolean; time: number; running: boolean; stability: unknown };
  await page.waitForFunction(() => (window as unknown as { __placode: Placode }).__placode?.loaded, null, { timeout: 60_000 });
  await page.waitForFunction(() => document.querySelectorAll('#dispersion-plot .mode-mark').length > 0, null, { timeout: 120_000 });
  await page.screenshot({ path: join(out, 'first-screen.png') });
  console.log('wrote viewer/docs/first-screen.png');
  await page.click('[data-tab="timeline-panel"]');
  await page.click('#run');
  await page.waitForFunction(() => (window as unknown as { __placode: Placode }).__placode.time >= 1.2, null, { timeout: 600_000, polling: 1000 });
  await page.click('#run');
  await page.waitForFunction(() => !(window as unknown as { __placode: Placode }).__placode.running);
  await page.screenshot({ path: join(out, 'running.png') });
  console.log('wrote viewer/docs/running.png');
  await page.click('[data-tab="stability-panel"]');
  await page.screenshot({ path: join(out, 'stability.png') });
  console.log('wrote viewer/docs/stability.png');
} finally {
  await browser.close();
  server.close();
}
