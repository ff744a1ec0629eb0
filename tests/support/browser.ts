// Driving the client in a real browser: Debian's Chromium through playwright-core, with every
// request that would leave the machine blocked and recorded, page errors collected, and
// screenshots written under test-artifacts/ (ignored by git). Used by the client's screenshot
// script (tests/ui/browser/screenshots.ts) and by end-to-end journeys.

import { mkdir } from 'node:fs/promises';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const CHROMIUM_PATH = process.env.KEEPWELL_CHROMIUM ?? '/usr/bin/chromium';

/** Headless, and quiet: no background traffic of the browser's own. */
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-quic',
];

export const ARTIFACTS_DIR = path.resolve(import.meta.dirname, '../../test-artifacts');

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS, headless: true });
}

export interface GuardedPage {
  page: Page;
  context: BrowserContext;
  /** `console.error` output and uncaught exceptions of the page, with the address they concern. */
  errors: { text: string; url: string }[];
  /** Every request to a host that is not loopback; each was aborted. Must stay empty. */
  remoteRequests: string[];
}

function isLoopback(url: URL) {
  return url.hostname === '127.0.0.1' || url.hostname === 'localhost' || url.hostname === '[::1]';
}

/** A fresh context (own cookies) and page at the given size, which can never reach the internet. */
export async function openPage(browser: Browser, { width = 1280, height = 800, baseURL }: { width?: number; height?: number; baseURL?: string } = {}): Promise<GuardedPage> {
  const context = await browser.newContext({ viewport: { width, height }, baseURL, deviceScaleFactor: 1 });
  const errors: GuardedPage['errors'] = [];
  const remoteRequests: string[] = [];
  await context.route('**/*', (route) => {
    const url = new URL(route.request().url());
    if (url.protocol === 'data:' || url.protocol === 'blob:' || isLoopback(url)) return route.fallback();
    remoteRequests.push(url.href);
    return route.abort('blockedbyclient');
  });
  const page = await context.newPage();
  page.on('console', (message) => {
    if (message.type() === 'error') errors.push({ text: message.text(), url: message.location().url });
  });
  page.on('pageerror', (error) => errors.push({ text: String(error), url: page.url() }));
  return { page, context, errors, remoteRequests };
}

/** Save a full-page screenshot as test-artifacts/<folder>/<name>.png and return its path. */
export async function screenshot(page: Page, name: string, { folder = 'screens', fullPage = true }: { folder?: string; fullPage?: boolean } = {}) {
  const dir = path.join(ARTIFACTS_DIR, folder);
  await mkdir(dir, { recursive: true });
  const file = path.join(dir, `${name}.png`);
  await page.screenshot({ path: file, fullPage });
  return file;
}

/** Serve a built client folder (SPA fallback included) with Vite's preview server on loopback. */
export async function servePreview(outDir: string, port = 4173): Promise<{ url: string; close: () => Promise<void> }> {
  const { preview } = await import('vite');
  const server = await preview({
    configFile: path.resolve(import.meta.dirname, '../../vite.config.ts'),
    logLevel: 'warn',
    build: { outDir },
    preview: { host: '127.0.0.1', port, strictPort: false, open: false },
  });
  const url = server.resolvedUrls?.local[0]?.replace(/\/$/, '');
  if (!url) throw new Error('the preview server did not report its address');
  return { url, close: () => server.close() };
}
