// Build the client and the editor check page, scan both builds for remote addresses, serve
// them on loopback, and photograph the main screens in Debian's Chromium against the mock API.
// Fails on any page error, any request that would leave the machine, or an editor that does
// not render, colour and mark. Screenshots land in test-artifacts/screens/.
// Run: npx tsx tests/ui/browser/screenshots.ts

import path from 'node:path';
import type { Browser } from 'playwright-core';
import { build } from 'vite';
import type { User } from '../../../shared/api/auth';
import { ARTIFACTS_DIR, launchBrowser, openPage, screenshot, servePreview, type GuardedPage } from '../../support/browser';
import { syntax } from '../../../src/design/palette';
import { blocks, outbox, users } from '../fixtures';
import { FINDINGS, RUN_ID } from '../runs-fixtures';
import { printScan, scanBuild } from './check-build';
import { DEMO_PASSWORD, mockApi } from './mock-api';

const root = path.resolve(import.meta.dirname, '../../..');
const configFile = path.join(root, 'vite.config.ts');
const appDir = path.join(root, 'dist/client');
const harnessDir = path.join(ARTIFACTS_DIR, 'editor-harness-build');
const problems: string[] = [];

function check(ok: boolean, what: string) {
  console.log(`${ok ? '  ok  ' : '  FAIL'} ${what}`);
  if (!ok) problems.push(what);
}

// The browser logs every 4xx answer as a console error. A 401 from the session probe (signed
// out) or from a refused sign-in is an expected answer, not a fault of the page.
function expected(error: { text: string; url: string }) {
  return /status of 401/.test(error.text) && /\/api\/auth\/(me|login)$/.test(error.url);
}

function settle(guarded: GuardedPage, name: string) {
  const errors = guarded.errors.filter((e) => !expected(e));
  check(errors.length === 0, `${name}: no page errors${errors.length ? ` (${errors.map((e) => `${e.text} [${e.url}]`).join(' | ')})` : ''}`);
  check(guarded.remoteRequests.length === 0, `${name}: no request left the machine${guarded.remoteRequests.length ? ` (${guarded.remoteRequests.join(', ')})` : ''}`);
}

async function shoot(
  browser: Browser,
  base: string,
  name: string,
  opts: { path: string; user: User | null; width?: number; height?: number; noBlocks?: boolean; noDecks?: boolean; ready: string; act?: (g: GuardedPage) => Promise<void> },
) {
  const guarded = await openPage(browser, { width: opts.width ?? 1280, height: opts.height ?? 800 });
  await mockApi(guarded.context, { user: opts.user, noBlocks: opts.noBlocks, noDecks: opts.noDecks });
  await guarded.page.goto(base + opts.path);
  await guarded.page.locator(opts.ready).first().waitFor({ timeout: 15_000 });
  await opts.act?.(guarded);
  await guarded.page.evaluate(() => document.fonts.ready);
  const file = await screenshot(guarded.page, name);
  console.log(`  shot ${path.relative(root, file)}`);
  settle(guarded, name);
  await guarded.context.close();
  return guarded;
}

async function main() {
  console.log('Building the client and the editor check page…');
  await build({ configFile, logLevel: 'warn' });
  await build({
    configFile,
    logLevel: 'warn',
    build: { outDir: harnessDir, emptyOutDir: true, rolldownOptions: { input: path.join(root, 'tests/ui/browser/editor-harness.html') } },
  });

  for (const dir of [appDir, harnessDir]) {
    const scan = await scanBuild(dir);
    printScan(path.relative(root, dir), scan);
    check(scan.violations.length === 0, `${path.relative(root, dir)} has no remote asset references`);
  }

  const app = await servePreview(appDir, 4173);
  const harness = await servePreview(harnessDir, 4183);
  const browser = await launchBrowser();
  try {
    console.log(`Screens (app at ${app.url})`);
    await shoot(browser, app.url, 'sign-in', { path: '/sign-in', user: null, ready: 'text=Sign in to Keepwell' });
    await shoot(browser, app.url, 'sign-in-error', {
      path: '/sign-in',
      user: null,
      ready: 'text=Sign in to Keepwell',
      act: async ({ page }) => {
        await page.getByLabel('E-mail address').fill(users.designer.email);
        await page.getByLabel('Password').fill('wrong password');
        await page.getByRole('button', { name: 'Sign in' }).click();
        await page.getByRole('alert').waitFor();
      },
    });
    await shoot(browser, app.url, 'sign-in-validation', {
      path: '/sign-in',
      user: null,
      ready: 'text=Sign in to Keepwell',
      act: async ({ page }) => {
        await page.getByLabel('E-mail address').fill('tomas@');
        await page.getByRole('button', { name: 'Sign in' }).click();
        await page.getByText('That does not look like an e-mail address.').waitFor();
        await page.keyboard.press('Tab'); // show the focus ring on the password field
      },
    });
    await shoot(browser, app.url, 'keyboard-focus', {
      path: '/sign-in',
      user: null,
      ready: 'text=Sign in to Keepwell',
      act: async ({ page }) => {
        // E-mail has focus on arrival; Tab, Tab, Tab reaches the button in reading order.
        for (const expected of ['Password', 'Forgot your password?', 'Sign in']) {
          await page.keyboard.press('Tab');
          const name: string = await page.evaluate(`(document.activeElement.labels?.[0]?.textContent ?? document.activeElement.textContent).trim()`);
          check(name === expected, `sign-in: Tab order reaches “${expected}” (got “${name}”)`);
        }
      },
    });
    await shoot(browser, app.url, 'skip-link', {
      path: '/blocks',
      user: users.designer,
      ready: 'table',
      act: async ({ page }) => {
        await page.keyboard.press('Tab');
        check((await page.evaluate(`document.activeElement.textContent`)) === 'Skip to content', 'shell: the first Tab stop is “Skip to content”');
      },
    });
    await shoot(browser, app.url, 'overview-designer', {
      path: '/sign-in?next=%2F',
      user: null,
      ready: 'text=Sign in to Keepwell',
      act: async ({ page }) => {
        await page.getByLabel('E-mail address').fill(users.designer.email);
        await page.getByLabel('Password').fill(DEMO_PASSWORD);
        await page.getByRole('button', { name: 'Sign in' }).click();
        await page.getByRole('heading', { name: 'Overview' }).waitFor();
        await page.getByText('lk_sa_periph').first().waitFor();
        const adminLinks = await page.getByRole('link', { name: 'Users & invitations' }).count();
        check(adminLinks === 0, 'designer: no Users & invitations link');
      },
    });
    await shoot(browser, app.url, 'overview-admin-1920', { path: '/', user: users.admin, width: 1920, height: 1080, ready: 'text=lk_sa_periph' });
    await shoot(browser, app.url, 'blocks-1920', { path: '/blocks', user: users.designer, width: 1920, height: 1080, ready: 'table' });
    await shoot(browser, app.url, 'blocks-new', {
      path: '/blocks',
      user: users.designer,
      ready: 'table',
      act: async ({ page }) => {
        await page.getByRole('button', { name: 'New block' }).click();
        await page.getByRole('button', { name: 'Create block' }).click();
        await page.getByText('This cannot be empty.').waitFor();
      },
    });
    await shoot(browser, app.url, 'blocks-empty', { path: '/blocks', user: users.reviewer, noBlocks: true, ready: 'text=No blocks yet' });
    await shoot(browser, app.url, 'block', { path: `/blocks/${blocks[1].id}`, user: users.designer, ready: 'table' });
    await shoot(browser, app.url, 'block-empty', { path: `/blocks/${blocks[0].id}`, user: users.designer, ready: 'text=No runs of this block yet' });
    await shoot(browser, app.url, 'run', { path: `/runs/${RUN_ID}`, user: users.reviewer, ready: 'tr[data-finding-id]' });
    await shoot(browser, app.url, 'run-finding', { path: `/runs/${RUN_ID}?tab=findings&finding=${FINDINGS[0].id}`, user: users.reviewer, width: 1440, height: 960, ready: '.monaco-editor .view-lines' });
    await shoot(browser, app.url, 'decks', { path: '/decks', user: users.methodology, ready: 'text=Larkspur core deck' });
    await shoot(browser, app.url, 'decks-empty', { path: '/decks', user: users.methodology, noDecks: true, ready: 'text=No rule decks listed yet' });
    await shoot(browser, app.url, 'admin-users', { path: '/admin/users', user: users.admin, ready: 'table' });
    await shoot(browser, app.url, 'admin-invite', {
      path: '/admin/users',
      user: users.admin,
      ready: 'table',
      act: async ({ page }) => {
        await page.getByRole('button', { name: 'Invite someone' }).click();
        await page.getByLabel('Name').fill('Mara Quist');
        await page.getByRole('button', { name: 'Edit roles of Hal Moreno' }).click();
      },
    });
    await shoot(browser, app.url, 'outbox', { path: '/admin/outbox', user: users.admin, ready: 'table' });
    await shoot(browser, app.url, 'outbox-message', { path: `/admin/outbox/${outbox[0].id}`, user: users.admin, ready: `text=${outbox[0].subject}` });
    await shoot(browser, app.url, 'tokens-empty', { path: '/settings/tokens', user: users.designer, ready: 'text=No tokens yet' });
    await shoot(browser, app.url, 'not-found', { path: '/no/such/page', user: users.designer, ready: 'text=No such page' });

    console.log(`Editor (check page at ${harness.url})`);
    await shoot(browser, harness.url, 'editor', {
      path: '/tests/ui/browser/editor-harness.html',
      user: null,
      ready: '.monaco-editor .view-lines',
      act: async ({ page }) => {
        const requested: string[] = [];
        page.on('request', (r) => requested.push(r.url()));
        await page.locator('.view-line', { hasText: 'Mkeep' }).waitFor();
        // A string, not a function: the TypeScript runner would wrap named helpers in code the page lacks.
        const readColours = `(() => {
          // Monaco writes spaces as no-break spaces and merges neighbouring tokens of one colour.
          const norm = (t) => t.replace(/\\u00a0/g, ' ').trim();
          const colour = (text) => {
            const el = [...document.querySelectorAll('.view-line span span')].find((s) => norm(s.textContent) === text || norm(s.textContent).startsWith(text + ' '));
            return el ? getComputedStyle(el).color : null;
          };
          return { mosfet: colour('Mkeep'), comment: colour('* output inverter'), command: colour('.subckt'), node: colour('dyn clk vdd vdd pch'), font: getComputedStyle(document.querySelector('.view-lines')).fontFamily };
        })()`;
        const rgb = (hex: string) => `rgb(${[1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)).join(', ')})`;
        const expected = { mosfet: rgb(syntax.mosfet), comment: rgb(syntax.comment), command: rgb(syntax.structure), node: rgb(syntax.text) };
        // Monaco colours lines after it has tokenized them, a moment after the text appears.
        await page.waitForFunction(`${readColours}.mosfet === ${JSON.stringify(expected.mosfet)}`, undefined, { timeout: 10_000 }).catch(() => undefined);
        const colours = (await page.evaluate(readColours)) as typeof expected & { font: string };
        console.log(`  colours ${JSON.stringify(colours)}`);
        for (const key of Object.keys(expected) as (keyof typeof expected)[]) check(colours[key] === expected[key], `editor: ${key} coloured ${expected[key]} (got ${colours[key]})`);
        check(colours.font.includes('IBM Plex Mono'), 'editor: set in IBM Plex Mono');
        check((await page.locator('.kw-glyph-error').count()) === 1 && (await page.locator('.kw-line-warning').count()) >= 2, 'editor: gutter marks and line tints drawn');
        await page.locator('.kw-glyph-error').click();
        await page.getByTestId('clicked').filter({ hasText: 'error@12' }).waitFor({ timeout: 5_000 });
        check(true, 'editor: clicking a gutter mark reports it');
        await page.locator('.unicode-highlight').first().waitFor({ timeout: 10_000 });
        const workers = page.workers().map((w) => new URL(w.url()).pathname);
        check(workers.length > 0 && workers.every((w) => w.startsWith('/assets/')), `editor: Monaco's worker runs from the bundle (${workers.join(', ')}) and marks the look-alike character`);
        await page.locator('.kw-glyph-warning').hover();
        await page.locator('.monaco-hover').first().waitFor({ timeout: 5_000 }).catch(() => undefined);
      },
    });
  } finally {
    await browser.close();
    await app.close();
    await harness.close();
  }

  if (problems.length) {
    console.log(`\n${problems.length} problem(s):\n- ${problems.join('\n- ')}`);
    process.exit(1);
  }
  console.log('\nAll screens rendered with no errors and no remote requests.');
}

await main();
