import { mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type Page } from 'playwright-core';

/** Screenshots go here (git-ignored), to be looked at after a run. */
export const ARTIFACTS_DIR = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));

/** Debian's chromium, never a browser download, with the flags that run it headless as root here. */
export async function launchChromium(): Promise<Browser> {
  mkdirSync(ARTIFACTS_DIR, { recursive: true });
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export async function screenshot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: `${ARTIFACTS_DIR}${name}.png`, fullPage: true });
}

/** Collects what the page reports as failing, so a test can assert there was none. */
export function watchForPageErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(`page error: ${error.message}`));
  page.on('console', (message) => {
    if (message.type() === 'error' && !message.text().includes('401')) errors.push(`console: ${message.text()}`);
  });
  return errors;
}
