// The review journey in a real browser (Debian's Chromium through playwright-core, nothing
// allowed off the machine): sign in as the demo designer, open a finished run of the demo,
// select a dynamic-node finding and see the editor scrolled to and highlighting its device's
// line (the highlighted line number must equal the finding's line), go from an instance to its
// subcircuit, and open the chain plot. Screenshots land in test-artifacts/review/.
//
//   npx tsx tests/e2e/review.ts
//       starts its own Keepwell: the project's PostgreSQL and Redis, a fresh database with the
//       demo seed, the client build, the web server and the worker on free ports; removes the
//       database and its Redis keys afterwards.
//   KEEPWELL_URL=http://127.0.0.1:5180 npx tsx tests/e2e/review.ts
//       against a running `npm start` (the demo database; it may add a run to the demo).
//
// When no finished demo run has a dynamic-node finding, the journey uploads the invented
// netlist set of ./review-netlists.ts through the API and waits for its run.

import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import type { RuleCatalogueEntry } from '../../shared/api/decks';
import type { RunDetail, RunView, StoredFinding } from '../../shared/api/runs';
import { repoRoot } from '../../server/config';
import { DEMO_BLOCKS, DEMO_USERS } from '../../server/seed/demo';
import { launchBrowser, openPage, screenshot, type GuardedPage } from '../support/browser';
import { NETLIST_SET } from './review-netlists';
import { decoratedLines, startKeepwell } from './support';

const problems: string[] = [];
function check(ok: boolean, what: string) {
  console.log(`${ok ? '  ok  ' : '  FAIL'} ${what}`);
  if (!ok) problems.push(what);
  return ok;
}
const say = (line: string) => console.log(`review: ${line}`);

// ------------------------------------------------------------------ the API, as the signed-in page

async function apiGet<T>(page: Page, url: string): Promise<T> {
  const res = await page.request.get(url);
  if (!res.ok()) throw new Error(`GET ${url}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

/** A finding of one of `ruleIds` in one of `runs`, preferring one that names devices. */
async function findingIn(page: Page, runs: RunView[], ruleIds: string[]): Promise<{ run: RunView; finding: StoredFinding } | null> {
  for (const run of runs) {
    const found = await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${run.id}/findings?rule=${ruleIds.join(',')}&pageSize=50`);
    const finding = found.items.find((f) => f.devices.length > 0) ?? found.items[0];
    if (finding) return { run, finding };
  }
  return null;
}

/**
 * A finished run of the demo with a finding of one of `ruleIds`, or null. A run that also has a
 * chain-plot finding comes first, so the journey sees every kind of picture whichever demo
 * runs the worker happened to finish first.
 */
async function findDemoRun(page: Page, ruleIds: string[]): Promise<{ run: RunView; finding: StoredFinding } | null> {
  // The seeded runs are queued at start: let the worker finish them first (a choice among all of them).
  for (const deadline = Date.now() + 120_000; Date.now() < deadline; await page.waitForTimeout(500)) {
    const open = await apiGet<{ total: number }>(page, '/api/runs?state=queued,running&pageSize=1');
    if (open.total === 0) break;
  }
  const { items: blocks } = await apiGet<{ items: { id: string; name: string }[] }>(page, '/api/blocks');
  let fallback: { run: RunView; finding: StoredFinding } | null = null;
  for (const block of blocks) {
    const runs = await apiGet<{ items: RunView[] }>(page, `/api/runs?blockId=${block.id}&state=succeeded&pageSize=50`);
    for (const run of runs.items) {
      const found = await findingIn(page, [run], ruleIds);
      if (!found) continue;
      const all = await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${run.id}/findings?pageSize=500`);
      if (all.items.some((f) => f.plot?.kind === 'chain')) return found;
      fallback ??= found;
    }
  }
  return fallback;
}

/** Upload a netlist set as a new run of the demo tag-compare block and wait for it to finish. */
async function uploadNetlist(page: Page, base: string, files: { path: string; text: string }[], note: string): Promise<RunView> {
  const { items: blocks } = await apiGet<{ items: { id: string; name: string }[] }>(page, '/api/blocks');
  const block = blocks.find((b) => b.name === 'lantern-tag-compare') ?? blocks.find((b) => DEMO_BLOCKS.some((d) => d.name === b.name)) ?? blocks[0];
  const form = new FormData();
  form.set('blockId', block.id);
  form.set('note', note);
  for (const file of files) form.append('files', new Blob([file.text], { type: 'text/plain' }), file.path);
  const res = await page.request.post('/api/runs', { multipart: form, headers: { Origin: base } });
  if (!res.ok()) throw new Error(`POST /api/runs: ${res.status()} ${await res.text()}`);
  const { run } = (await res.json()) as { run: RunView };
  const deadline = Date.now() + 180_000;
  for (;;) {
    const now = await apiGet<RunView>(page, `/api/runs/${run.id}`);
    if (now.state === 'succeeded') return now;
    if (now.state === 'failed' || now.state === 'cancelled') throw new Error(`the uploaded run ${now.state}: ${now.error ?? ''}`);
    if (Date.now() > deadline) throw new Error(`the uploaded run is still ${now.state} after 3 minutes`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

// ------------------------------------------------------------------ reading Monaco's DOM

/** The line number the cursor is on, from the gutter's active-line mark. */
async function cursorLine(editor: Locator): Promise<number> {
  return editor.evaluate((root) => Number(root.querySelector('.margin-view-overlays .line-numbers.active-line-number')?.textContent ?? NaN));
}

function clean(g: GuardedPage, step: string) {
  const errors = g.errors.filter((e) => !(/status of 401/.test(e.text) && /\/api\/auth\/(me|login)$/.test(e.url)));
  check(errors.length === 0, `${step}: no page errors${errors.length ? ` (${errors.map((e) => `${e.text} [${e.url}]`).join(' | ')})` : ''}`);
  check(g.remoteRequests.length === 0, `${step}: nothing fetched from outside the machine${g.remoteRequests.length ? ` (${g.remoteRequests.join(', ')})` : ''}`);
}

// ------------------------------------------------------------------ the journey

async function journey(base: string) {
  const designer = DEMO_USERS.find((u) => u.roles.includes('designer'))!;
  const browser = await launchBrowser();
  try {
    const guarded = await openPage(browser, { baseURL: base, width: 1440, height: 960 });
    const { page } = guarded;

    await page.goto('/sign-in');
    await page.getByLabel('E-mail address').fill(designer.email);
    await page.getByLabel('Password').fill(designer.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    check(true, `signed in as the demo designer ${designer.name}`);

    const { items: catalogue } = await apiGet<{ items: RuleCatalogueEntry[] }>(page, '/api/rules');
    const dynamicRules = catalogue.filter((r) => r.area === 'dynamic').map((r) => r.id);
    if (!check(dynamicRules.length > 0, `the rule catalogue has dynamic-node rules (${dynamicRules.join(', ') || 'none'})`)) return;

    let found = await findDemoRun(page, dynamicRules);
    if (!found) {
      say('no finished demo run has a dynamic-node finding: uploading the demo netlist set through the API');
      const run = await uploadNetlist(page, base, NETLIST_SET, 'Uploaded by the review journey (tests/e2e/review.ts).');
      found = await findingIn(page, [run], dynamicRules);
      check(found !== null, 'the uploaded run finished with a dynamic-node finding');
      if (!found) return;
    }
    const { run, finding } = found;
    const detail = await apiGet<RunDetail>(page, `/api/runs/${run.id}`);
    say(`run ${run.id} of ${run.block.name}; finding ${finding.id} (${finding.ruleId}) at ${finding.file}:${finding.line}`);

    // Open the run, narrow the table to the dynamic rules, choose the finding with the keyboard.
    await page.goto(`/runs/${run.id}?tab=findings&rule=${encodeURIComponent(finding.ruleId)}`);
    const row = page.locator(`tr[data-finding-id="${finding.id}"]`);
    await row.waitFor({ timeout: 20_000 });
    await page.locator('tr[data-finding-id]').first().focus();
    const position = await page.locator('tr[data-finding-id]').evaluateAll((rows, id) => rows.findIndex((r) => r.getAttribute('data-finding-id') === id), String(finding.id));
    for (let i = 0; i < position; i++) await page.keyboard.press('j');
    await page.keyboard.press('Enter');
    await page.waitForURL((u) => u.searchParams.get('finding') === String(finding.id));
    check(true, 'the finding was chosen with j and Enter, and its id is in the address');
    const aside = page.getByRole('complementary', { name: 'Selected finding' });
    await aside.getByText(finding.message).waitFor();
    check(await aside.getByText('Not waived.').isVisible(), 'the detail shows the waiver state');

    const editor = page.locator('.monaco-editor').first();
    await editor.waitFor({ timeout: 30_000 });
    await page.locator('.view-overlays .kw-line-focus').first().waitFor({ timeout: 20_000 });
    await page.waitForTimeout(600); // the smooth scroll to the line
    const focused = await decoratedLines(editor, 'kw-line-focus');
    check(focused.length === 1 && focused[0] === finding.line, `the editor highlights line ${focused.join(', ')} — the finding’s line is ${finding.line}`);
    const text = (await apiGet<{ text: string }>(page, `/api/runs/${run.id}/file?path=${encodeURIComponent(finding.file)}`)).text;
    const lineText = text.split(/\r\n|\r|\n/)[finding.line - 1] ?? '';
    const element = lineText.trim().split(/\s+/)[0] ?? '';
    // Devices are named from the finding's cell: a device inside a child instance by its path (xcy/mpc3).
    const leafName = (d: string) => d.split('/').pop()!.toLowerCase();
    check(finding.devices.some((d) => leafName(d) === element.toLowerCase()), `line ${finding.line} is the line of device ${element}, which the finding names (${finding.devices.join(', ')})`);
    const box = await page.locator('.view-overlays .kw-line-focus').first().boundingBox();
    const frame = await editor.boundingBox();
    check(Boolean(box && frame && box.y >= frame.y && box.y + box.height <= frame.y + frame.height), 'the highlighted line is scrolled into the editor’s view');
    const marks = await page.locator('.kw-glyph').count();
    check(marks > 0, `the gutter marks the file’s findings (${marks} marks rendered)`);
    const everything = await apiGet<{ items: StoredFinding[]; total: number }>(page, `/api/runs/${run.id}/findings?pageSize=500`);
    const inFile = everything.items.filter((f) => f.file === finding.file).length;
    const counter = (await page.getByText(/in this file$/).first().textContent()) ?? '';
    check(everything.total <= 500 && counter.endsWith(`of ${inFile} in this file`), `the editor counts the file’s ${inFile} findings (“${counter}”)`);
    await page.getByRole('heading', { name: 'Netlist' }).scrollIntoViewIfNeeded();
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'dynamic-finding', { folder: 'review' }))}`);

    // Go to definition (F12) from the file's first instance line to the .subckt it names, in whichever file defines it.
    const lines = text.split(/\r\n|\r|\n/);
    const files = await Promise.all(detail.files.map(async (f) => ({ path: f.path, text: (await apiGet<{ text: string }>(page, `/api/runs/${run.id}/file?path=${encodeURIComponent(f.path)}`)).text })));
    const definitionOf = (cell: string) =>
      files.flatMap((f) => f.text.split(/\r\n|\r|\n/).map((l, i) => ({ path: f.path, line: i + 1, l }))).find((x) => {
        const m = /^\s*\.subckt\s+(\S+)/i.exec(x.l);
        return m !== null && m[1].toLowerCase() === cell.toLowerCase();
      });
    const instances = lines
      .map((l, i) => ({ l, i }))
      .filter(({ l }) => /^x/i.test(l))
      .map(({ l, i }) => {
        const words = l.split(/\s+/);
        const slash = words.findIndex((w) => w.startsWith('/'));
        const positional = words.filter((w) => !w.includes('='));
        const cell = slash > 0 ? words[slash].slice(1) || words[slash + 1] : positional[positional.length - 1];
        return { instance: i, cell, column: l.indexOf(cell, l.indexOf(' ')) + 1, target: definitionOf(cell) };
      })
      .filter((x) => x.target);
    // Prefer an instance whose subcircuit lives in another file, to see the editor switch files.
    const chosen = instances.find((x) => x.target!.path !== finding.file) ?? instances[0];
    if (check(Boolean(chosen), `the finding’s file has an instance of a subcircuit defined in the run${chosen ? ` (${chosen.cell}, line ${chosen.instance + 1})` : ''}`)) {
      const { instance, cell, column, target } = chosen;
      await editor.locator('.view-lines').click();
      await page.keyboard.press('Control+Home');
      for (let i = 0; i < instance; i++) await page.keyboard.press('ArrowDown');
      await page.keyboard.press('Home');
      for (let i = 1; i < column + 1; i++) await page.keyboard.press('ArrowRight');
      await page.keyboard.press('F12');
      await page.waitForTimeout(1000);
      const shownFile = detail.files.length > 1 ? await page.getByLabel('File', { exact: true }).inputValue() : detail.files[0].path;
      check(shownFile === target!.path, `F12 on ${cell} shows ${target!.path}${target!.path === finding.file ? '' : ', another file of the run'} (shown: ${shownFile})`);
      check((await cursorLine(page.locator('.monaco-editor').first())) === target!.line, `and puts the cursor on its .subckt line ${target!.line}`);
      say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'go-to-definition', { folder: 'review', fullPage: false }))}`);
    }

    // The chain plot: a finding whose picture is the staircase through a chain of stages.
    let chain: StoredFinding | undefined;
    for (let p = 1; !chain && p <= 20; p++) {
      const pageOf = await apiGet<{ items: StoredFinding[]; total: number }>(page, `/api/runs/${run.id}/findings?pageSize=200&page=${p}`);
      chain = pageOf.items.find((f) => f.plot?.kind === 'chain');
      if (p * 200 >= pageOf.total) break;
    }
    if (check(Boolean(chain), 'the run has a finding with a chain plot')) {
      await page.goto(`/runs/${run.id}?tab=findings&rule=${encodeURIComponent(chain!.ruleId)}&finding=${chain!.id}`);
      const plot = page.locator('svg[data-plot="chain"]');
      await plot.waitFor({ timeout: 20_000 });
      await plot.scrollIntoViewIfNeeded();
      const steps = await plot.locator('[data-step]').count();
      check(steps === (chain!.plot as { levels: number[] }).levels.length - 1, `the chain plot draws one staircase corner per stage (${steps})`);
      say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'chain-plot', { folder: 'review' }))}`);
      await plot.locator('xpath=ancestor::figure').screenshot({ path: path.join(repoRoot, 'test-artifacts', 'review', 'chain-plot-figure.png') });
    }

    // The other two pictures, as figures: a stage's transfer curve and the dynamic node's budget bars.
    for (const [kind, name] of [
      ['transfer', 'transfer-plot-figure'],
      ['budget', 'budget-plot-figure'],
    ] as const) {
      const withPlot = (await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${run.id}/findings?pageSize=200`)).items.find((f) => f.plot?.kind === kind);
      if (!withPlot) continue;
      await page.goto(`/runs/${run.id}?tab=findings&finding=${withPlot.id}`);
      const figure = page.locator(`svg[data-plot="${kind}"]`);
      await figure.waitFor({ timeout: 20_000 });
      await figure.scrollIntoViewIfNeeded();
      await figure.locator('xpath=ancestor::figure').screenshot({ path: path.join(repoRoot, 'test-artifacts', 'review', `${name}.png`) });
      say(`screenshot test-artifacts/review/${name}.png (${withPlot.ruleId})`);
    }

    // The same review at the smallest supported width.
    await page.setViewportSize({ width: 1280, height: 800 });
    await page.goto(`/runs/${run.id}?tab=findings&finding=${finding.id}`);
    await page.locator('.view-overlays .kw-line-focus').first().waitFor({ timeout: 20_000 });
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    check(overflow <= 0, `at 1280 px the page does not scroll sideways (${overflow} px over)`);
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'run-1280', { folder: 'review' }))}`);

    // Comparison by fingerprint: the journey's netlist set, then the same set with every line
    // moved down by a comment, must match finding for finding — nothing new, nothing fixed.
    await page.setViewportSize({ width: 1440, height: 960 });
    const first = await uploadNetlist(page, base, NETLIST_SET, 'Review journey: comparison base.');
    const moved = NETLIST_SET.map((f) => ({ ...f, text: `* every line moved down by one for the comparison check\n${f.text}` }));
    // The second set goes through the block page's form, as a designer submits it.
    await page.goto(`/blocks/${first.block.id}`);
    await page.getByRole('button', { name: /Submit a netlist/ }).click();
    const form = page.getByRole('form', { name: 'Submit a netlist for checking' });
    await form.getByLabel('Netlist files or a bundle').setInputFiles(moved.map((f) => ({ name: f.path, mimeType: 'text/plain', buffer: Buffer.from(f.text) })));
    await form.getByRole('list', { name: 'Files to submit' }).waitFor();
    const deckChoice = form.getByRole('combobox', { name: 'Rule deck version' });
    await page.waitForFunction(() => (document.querySelector('#run-deck-version') as HTMLSelectElement | null)?.value !== '');
    check((await deckChoice.inputValue()) === first.deck.versionId, 'the form preselects the team’s default deck version, the one the API used');
    await form.getByRole('textbox', { name: 'Note' }).fill('Review journey: the same netlist with its lines moved.');
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'submit-form', { folder: 'review', fullPage: false }))}`);
    await form.getByRole('button', { name: 'Start the check' }).click();
    await page.waitForURL((u) => /^\/runs\/[0-9a-f-]{36}$/.test(u.pathname));
    const secondId = new URL(page.url()).pathname.split('/').pop()!;
    await page.locator('[data-state="succeeded"]').first().waitFor({ timeout: 180_000 });
    // The page may show another finished run first: the API says when this one has finished.
    let second = await apiGet<RunView>(page, `/api/runs/${secondId}`);
    for (const deadline = Date.now() + 180_000; second.state !== 'succeeded' && Date.now() < deadline; ) {
      await page.waitForTimeout(500);
      second = await apiGet<RunView>(page, `/api/runs/${secondId}`);
    }
    check(second.state === 'succeeded', `the run page followed the submitted run until it finished (${second.state})`);
    const compared = await apiGet<{ counts: { new: number; fixed: number; persisting: number } }>(page, `/api/runs/${second.id}/compare/${first.id}?kind=persisting`);
    const firstTotal = (await apiGet<{ total: number }>(page, `/api/runs/${first.id}/findings?pageSize=1`)).total;
    check(compared.counts.new === 0 && compared.counts.fixed === 0 && compared.counts.persisting === firstTotal, `moved lines still match: ${JSON.stringify(compared.counts)} of ${firstTotal} findings`);
    await page.goto(`/runs/${second.id}?tab=compare&base=${first.id}&kind=persisting`);
    await page.getByRole('tab', { name: new RegExp(`Persisting ${firstTotal}`) }).waitFor({ timeout: 20_000 });
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'compare', { folder: 'review' }))}`);
    await page.goto(`/runs/${second.id}?tab=summary`);
    await page.getByRole('table', { name: 'Findings by rule' }).waitFor();
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'summary', { folder: 'review' }))}`);
    await page.goto(`/blocks/${second.block.id}`);
    await page.getByRole('table', { name: /Runs of/ }).waitFor();
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'block-runs', { folder: 'review' }))}`);

    // On a large monitor.
    await page.setViewportSize({ width: 1920, height: 1080 });
    await page.goto(`/runs/${run.id}?tab=findings&finding=${finding.id}`);
    await page.locator('.view-overlays .kw-line-focus').first().waitFor({ timeout: 20_000 });
    say(`screenshot ${path.relative(repoRoot, await screenshot(page, 'run-1920', { folder: 'review', fullPage: false }))}`);

    // A shared link to a finding that the filtered table does not hold is opened by its id.
    const otherSeverity = finding.severity === 'info' ? 'error' : 'info';
    await page.goto(`/runs/${run.id}?tab=findings&severity=${otherSeverity}&finding=${finding.id}`);
    await page.getByRole('complementary', { name: 'Selected finding' }).getByText(finding.message).waitFor({ timeout: 20_000 });
    check((await page.locator(`tr[data-finding-id="${finding.id}"]`).count()) === 0, 'a shared link opens its finding even when the filtered table does not list it');

    clean(guarded, 'review journey');
    await guarded.context.close();
  } finally {
    await browser.close();
  }
}

const external = process.env.KEEPWELL_URL?.replace(/\/$/, '');
const own = external ? null : await startKeepwell('review', { log: say });
try {
  await journey(external ?? own!.base);
} catch (error) {
  check(false, `the journey ran to its end (${error instanceof Error ? error.message : String(error)})`);
} finally {
  await own?.stop();
}
console.log(problems.length ? `\n${problems.length} check(s) failed` : '\nAll review checks passed');
process.exit(problems.length ? 1 : 0);
