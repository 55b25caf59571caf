import { mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

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

/**
 * How long one browser step may wait. Generous, because the machine may be busy with other work (a
 * production build, a solver benchmark); a step that is really stuck still fails with its locator named.
 */
export const STEP_TIMEOUT_MS = 60_000;

/** A fresh browser context (own cookies, so its own session) and a page in it. */
export async function newSignedOutPage(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  context.setDefaultTimeout(STEP_TIMEOUT_MS);
  context.setDefaultNavigationTimeout(STEP_TIMEOUT_MS);
  return { context, page: await context.newPage() };
}

export async function screenshot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: `${ARTIFACTS_DIR}${name}.png`, fullPage: true });
}

/**
 * Collects what the page reports as failing, so a test can assert there was none. The browser logs every
 * refused request; those with a status the test expects (401 before signing in, and whatever the test
 * passes, e.g. 409 for a stale save) are not failures.
 */
export function watchForPageErrors(page: Page, expectedStatuses: readonly number[] = []): string[] {
  const errors: string[] = [];
  const ignored = new Set([401, ...expectedStatuses]);
  page.on('pageerror', (error) => errors.push(`page error: ${error.message}`));
  page.on('console', (message) => {
    if (message.type() !== 'error') return;
    const status = /responded with a status of (\d+)/.exec(message.text());
    if (status && ignored.has(Number(status[1]))) return;
    errors.push(`console: ${message.text()}`);
  });
  return errors;
}

/** Signs in through the sign-in page and waits for the project list. */
export async function signIn(page: Page, baseUrl: string, user: { readonly username: string; readonly password: string }): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('Username').fill(user.username);
  await page.getByLabel('Password').fill(user.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/projects$/);
}
