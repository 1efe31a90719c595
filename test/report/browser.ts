// Headless Chromium for the report tests, driven by playwright-core. Which browser (and what happens
// without one) is decided once per run in test/chromium.ts, which vitest.config.ts asks: it passes
// the browser it found in LEADLINE_CHROMIUM, and leaves these tests out when there is none.
import { chromium, type Browser } from 'playwright-core';
import { findChromium } from '../chromium.js';

export async function launch(): Promise<Browser> {
  const { found, tried } = findChromium();
  if (!found)
    throw new Error(
      `No Chromium (tried ${tried.join(', ')}): install it (Debian: apt-get install -y chromium) or set LEADLINE_CHROMIUM.`,
    );
  return chromium.launch({
    executablePath: found,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking'],
  });
}
