import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

/** Debian's Chromium (or PLACODE_CHROMIUM), driven by playwright-core; software WebGL (SwiftShader). */
export const CHROMIUM = process.env.PLACODE_CHROMIUM ?? '/usr/bin/chromium';

export const haveChromium = existsSync(CHROMIUM);
if (!haveChromium) {
  const message = `SKIPPED: no Chromium at ${CHROMIUM}; the viewer's browser tests need it (apt-get install chromium, or set PLACODE_CHROMIUM)`;
  if (process.env.PLACODE_CHROMIUM) throw new Error(message.replace('SKIPPED', 'PLACODE_CHROMIUM is set but'));
  process.stderr.write(`\n*** ${message} ***\n\n`);
}

export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic', '--use-angle=swiftshader', '--enable-unsafe-swiftshader'],
  });
}
