/**
 * Debian's Chromium driven by playwright-core (never a downloaded browser). The flags keep a headless
 * root run quiet on a machine without outside network: no sandbox, no GPU, no background services.
 * playwright gives each launch a new, empty profile folder of its own.
 */
import { mkdirSync } from "node:fs";
import path from "node:path";
import { type Browser, type BrowserContext, chromium, type Page } from "playwright-core";

export function e2eEnv() {
  const appUrl = process.env.E2E_APP_URL;
  const inboxUrl = process.env.E2E_INBOX_URL;
  if (!appUrl || !inboxUrl) {
    throw new Error(
      "E2E_APP_URL and E2E_INBOX_URL are not set: run the suites through `bash deploy/test.sh`.",
    );
  }
  const artifactsDir = process.env.E2E_ARTIFACTS_DIR ?? path.resolve(".artifacts/e2e");
  mkdirSync(artifactsDir, { recursive: true });
  return { appUrl, inboxUrl, artifactsDir, chromiumPath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium" };
}

export async function launchChromium(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  const { chromiumPath } = e2eEnv();
  const browser = await chromium.launch({
    executablePath: chromiumPath,
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-dev-shm-usage",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-quic",
      "--no-first-run",
    ],
  });
  return {
    browser,
    close: () => browser.close(),
  };
}

export async function newPage(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
  const page = await context.newPage();
  page.setDefaultTimeout(15_000);
  return { context, page };
}

/**
 * The whole page by default; `fullPage: false` takes what the window shows (scrolled pages with a sticky
 * header or side bar look as a person sees them).
 */
export async function screenshot(
  page: Page,
  name: string,
  options: { fullPage?: boolean } = {},
): Promise<void> {
  const { artifactsDir } = e2eEnv();
  await page.screenshot({ path: path.join(artifactsDir, `${name}.png`), fullPage: options.fullPage ?? true });
}
