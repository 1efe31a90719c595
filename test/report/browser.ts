// Headless Chromium for the report tests (Debian's chromium driven by playwright-core). A missing
// browser is a failure with a clear message, never a silent skip: CI installs it.
import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

export const CHROMIUM = '/usr/bin/chromium';

export async function launch(): Promise<Browser> {
  if (!existsSync(CHROMIUM))
    throw new Error(
      `${CHROMIUM} is missing: the report tests render in real headless Chromium. Install it with ` +
        '`apt-get install -y chromium` (.ci/run does this in CI).',
    );
  return chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking'],
  });
}
