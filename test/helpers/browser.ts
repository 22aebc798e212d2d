// Opens a page in Debian's headless Chromium (playwright-core, never a downloaded browser) with a fresh
// profile, recording console errors, page errors and every request the page makes.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { REPO_ROOT } from './cli.js';
import { tempDir } from './temp-dir.js';

export const CHROMIUM_PATH = '/usr/bin/chromium';
/** Where screenshots are kept (gitignored; CI can upload the folder). */
export const ARTIFACTS_DIR = join(REPO_ROOT, 'test-artifacts');

export interface OpenedPage {
  readonly page: Page;
  readonly consoleErrors: string[];
  readonly requests: string[];
  screenshot(name: string): Promise<string>;
  close(): Promise<void>;
}

/** Launches Chromium headless (no sandbox, no GPU, no QUIC, no background networking) and opens `url`. */
export async function openInChromium(url: string): Promise<OpenedPage> {
  const context: BrowserContext = await chromium.launchPersistentContext(tempDir('driftlight-chromium-'), {
    executablePath: CHROMIUM_PATH,
    headless: true,
    viewport: { width: 1200, height: 900 },
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const page = await context.newPage();
  const consoleErrors: string[] = [];
  const requests: string[] = [];
  page.on('console', (message) => {
    if (message.type() === 'error') consoleErrors.push(message.text());
  });
  page.on('pageerror', (error) => consoleErrors.push(error.message));
  page.on('request', (request) => requests.push(request.url()));
  await page.goto(url, { waitUntil: 'load' });
  return {
    page,
    consoleErrors,
    requests,
    async screenshot(name: string): Promise<string> {
      mkdirSync(ARTIFACTS_DIR, { recursive: true });
      const path = join(ARTIFACTS_DIR, name);
      await page.screenshot({ path, fullPage: true });
      return path;
    },
    close: () => context.close(),
  };
}

/** Per chart figure on the page: its id and how many drawn data marks (symbol, line and rule paths) its SVG holds. */
export async function chartMarks(page: Page): Promise<{ id: string; points: number; lines: number }[]> {
  return page.$$eval('figure.chart', (figures) =>
    figures.map((figure) => ({
      id: figure.getAttribute('data-chart') ?? '',
      points: figure.querySelectorAll('svg g.mark-symbol path').length,
      lines: figure.querySelectorAll('svg g.mark-line path').length,
    })),
  );
}
