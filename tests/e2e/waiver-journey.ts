// From a designer's upload to a waived finding, in the browser and the mail:
//
//  1. the demo designer makes a block and submits a demo netlist through its form, and the run
//     page's progress bar follows the run until it has finished;
//  2. she opens a dynamic-node finding: the editor view highlights the device's line; she asks
//     to waive it, with a justification;
//  3. the demo reviewer gets the request by mail (read from the mail catcher the server sends
//     to), opens its link in a browser of his own, signs in and approves;
//  4. the designer is told by mail, submits the same netlist again, and the finding of the new
//     run with the same fingerprint shows as waived.

import fs from 'node:fs';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import type { RuleCatalogueEntry } from '../../shared/api/decks';
import type { RunView, StoredFinding } from '../../shared/api/runs';
import { repoRoot } from '../../server/config';
import type { FakeSmtp } from '../../server/mail/fake-smtp';
import { DEMO_USERS } from '../../server/seed/demo';
import { openPage, screenshot } from '../support/browser';
import { apiGet, decoratedLines, signIn, until, type Checks } from './support';

/** The demo netlist the designer submits: the Lantern ALU's domino carry chain (it has dynamic nodes). */
export const JOURNEY_NETLIST = { name: 'lantern-alu-domino.sp', path: path.join(repoRoot, 'server', 'seed', 'demo-netlists', 'lantern-alu-domino.sp') };
export const JOURNEY_BLOCK = 'lantern-alu-review';

/**
 * Records every reading of any progress bar the page shows from now on (a MutationObserver, so a
 * bar shown for a single frame counts), in `window.keepwellBarReadings`. A string, not a function:
 * tsx would wrap named helpers in code the page does not have.
 */
const WATCH_PROGRESS_BARS = `(() => {
  window.keepwellBarReadings = [];
  const record = () => {
    for (const el of document.querySelectorAll('[role="progressbar"]')) {
      const text = el.getAttribute('aria-valuetext');
      const all = window.keepwellBarReadings;
      if (text && all[all.length - 1] !== text) all.push(text);
    }
  };
  new MutationObserver(record).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ['aria-valuetext'] });
})()`;

/** Submit the journey's netlist through the block page's form; returns the new run's id once its page is shown. */
export async function submitThroughForm(page: Page, blockId: string, note: string, { watchProgress = false } = {}): Promise<string> {
  await page.goto(`/blocks/${blockId}`);
  // The page stays one document from the form to the run's page (client-side navigation).
  if (watchProgress) await page.evaluate(WATCH_PROGRESS_BARS);
  await page.getByRole('button', { name: /Submit a netlist/ }).click();
  const form = page.getByRole('form', { name: 'Submit a netlist for checking' });
  await form.getByLabel('Netlist files or a bundle').setInputFiles({ name: JOURNEY_NETLIST.name, mimeType: 'text/plain', buffer: fs.readFileSync(JOURNEY_NETLIST.path) });
  await form.getByRole('list', { name: 'Files to submit' }).waitFor();
  await page.waitForFunction(() => (document.querySelector('#run-deck-version') as HTMLSelectElement | null)?.value !== '');
  await form.getByRole('textbox', { name: 'Note' }).fill(note);
  await form.getByRole('button', { name: 'Start the check' }).click();
  await page.waitForURL((u) => /^\/runs\/[0-9a-f-]{36}$/.test(u.pathname));
  return new URL(page.url()).pathname.split('/').pop()!;
}

export async function waitForRun(page: Page, runId: string): Promise<RunView> {
  const run = await until(() => apiGet<RunView>(page, `/api/runs/${runId}`), (r) => ['succeeded', 'failed', 'cancelled'].includes(r.state), 180_000, `run ${runId} finishes`);
  if (run.state !== 'succeeded') throw new Error(`run ${runId} ${run.state}: ${run.error ?? ''}`);
  return run;
}

export async function waiverJourney(browser: Browser, base: string, smtp: FakeSmtp, checks: Checks, holdQueue: () => Promise<() => Promise<void>>): Promise<{ blockId: string }> {
  const check = checks.check.bind(checks);
  const say = checks.say.bind(checks);
  const designer = DEMO_USERS.find((u) => u.roles.includes('designer'))!;
  const reviewer = DEMO_USERS.find((u) => u.roles.includes('reviewer'))!;

  const d = await openPage(browser, { baseURL: base, width: 1440, height: 960 });
  const page = d.page;
  await signIn(page, designer);

  // 1. A block of her own, and the demo netlist submitted through its form.
  await page.goto('/blocks');
  await page.getByRole('button', { name: 'New block' }).click();
  await page.getByLabel('Name').fill(JOURNEY_BLOCK);
  await page.getByLabel('Description').fill('The ALU carry chain, reviewed by the end-to-end journey.');
  await page.getByRole('button', { name: 'Create block' }).click();
  await page.waitForURL((u) => /^\/blocks\/[0-9a-f-]{36}$/.test(u.pathname));
  const blockId = new URL(page.url()).pathname.split('/').pop()!;
  check(true, `the designer made block ${JOURNEY_BLOCK}`);

  // The queue is held while the run is submitted, so its page shows it waiting whatever the
  // machine's speed; then the worker may take it, and the page follows it to the end.
  const resume = await holdQueue();
  let runId: string;
  const bar = page.getByRole('progressbar').first();
  try {
    runId = await submitThroughForm(page, blockId, 'First check of the carry chain.', { watchProgress: true });
    await bar.waitFor({ timeout: 20_000 });
    say(`screenshot ${await screenshot(page, 'waiver-1-progress', { folder: 'e2e', fullPage: false })}`);
  } finally {
    await resume();
  }
  // Follow the run until its state says it has finished.
  const finished = page.locator('[data-state="succeeded"], [data-state="failed"]').first();
  for (const deadline = Date.now() + 180_000; !(await finished.isVisible()) && Date.now() < deadline; ) await page.waitForTimeout(50);
  const first = await waitForRun(page, runId);
  const readings = (await page.evaluate('window.keepwellBarReadings')) as string[];
  say(`progress bar readings: ${readings.join(' → ')}`);
  const percents = readings.map((r) => Number(/^(\d+) %/.exec(r)?.[1] ?? NaN)).filter(Number.isFinite);
  check(
    readings.length > 0 && percents.every((p, i) => i === 0 || p >= percents[i - 1]),
    `the run page showed a progress bar while the run was unfinished, never going backwards (${readings.length} readings${percents.length ? `: ${percents.join(' %, ')} %` : ''})`,
  );
  await finished.waitFor({ timeout: 20_000 });
  check(true, `the run page shows the run finished (${first.summary?.errors} errors, ${first.summary?.warnings} warnings)`);

  // 2. A dynamic-node finding, in the editor view, and the request to waive it.
  const { items: catalogue } = await apiGet<{ items: RuleCatalogueEntry[] }>(page, '/api/rules');
  const dynamicRules = catalogue.filter((r) => r.area === 'dynamic').map((r) => r.id);
  const { items } = await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${runId}/findings?rule=${dynamicRules.join(',')}&pageSize=100`);
  const finding = items.find((f) => f.devices.length > 0 && f.status === 'open');
  if (!check(Boolean(finding), `the run has an open dynamic-node finding naming devices (${items.length} dynamic findings)`)) return { blockId };
  say(`finding ${finding!.id}: ${finding!.ruleId} at ${finding!.file}:${finding!.line}`);
  await page.goto(`/runs/${runId}?tab=findings&rule=${encodeURIComponent(finding!.ruleId)}`);
  await page.locator(`tr[data-finding-id="${finding!.id}"]`).click();
  await page.waitForURL((u) => u.searchParams.get('finding') === String(finding!.id));
  const aside = page.getByRole('complementary', { name: 'Selected finding' });
  await aside.getByText(finding!.message).waitFor();
  const editor = page.locator('.monaco-editor').first();
  // Monaco is a lazy chunk of a few megabytes: on a loaded two-core machine it takes a while to start.
  await editor.waitFor({ timeout: 60_000 });
  await page.locator('.view-overlays .kw-line-focus').first().waitFor({ timeout: 30_000 });
  await page.waitForTimeout(600); // the smooth scroll to the line
  const focused = await decoratedLines(editor, 'kw-line-focus');
  check(focused.length === 1 && focused[0] === finding!.line, `the editor view highlights line ${focused.join(', ')}; the finding is on line ${finding!.line}`);

  await aside.getByRole('button', { name: 'Ask to waive' }).click();
  const request = aside.getByRole('form', { name: 'Ask to waive this finding' });
  const justification = 'The keeper and the evaluation stack were sized together in the carry-chain review of week 48; the margin holds at every corner of the deck.';
  await request.getByLabel('Justification').fill(justification);
  say(`screenshot ${await screenshot(page, 'waiver-2-request', { folder: 'e2e', fullPage: false })}`);
  await request.getByRole('button', { name: 'Ask a reviewer' }).click();
  await aside.locator('[data-waiver-state="waiver-requested"]').waitFor({ timeout: 20_000 });
  check(true, 'the finding shows the waiver as requested');

  // 3. The reviewer's mail, its link, sign-in and approval.
  const mail = await smtp.waitFor((m) => m.to.includes(reviewer.email) && /waiver requested/i.test(m.subject), 30_000);
  const link = /Review the request: (\S+)/.exec(mail.text)?.[1] ?? '';
  check(link.startsWith(`${base}/waivers/`), `the reviewer was mailed “${mail.subject}” with a link to the waiver (${link})`);
  check(mail.text.includes(justification), 'the mail quotes the justification');
  const r = await openPage(browser, { baseURL: base, width: 1440, height: 960 });
  await r.page.goto(link);
  await r.page.waitForURL((u) => u.pathname.startsWith('/sign-in'));
  check(true, 'the link asks the reviewer to sign in first');
  await signIn(r.page, reviewer);
  await r.page.waitForURL((u) => u.pathname === new URL(link).pathname);
  check(true, 'and then lands on the waiver');
  const decision = r.page.getByRole('form', { name: 'Decide on the request' });
  await decision.getByLabel('Comment').fill('Sizing checked against the week-48 review notes.');
  say(`screenshot ${await screenshot(r.page, 'waiver-3-decision', { folder: 'e2e', fullPage: false })}`);
  await decision.getByRole('button', { name: 'Approve' }).click();
  await r.page.getByRole('list', { name: 'History' }).getByText('Approved').waitFor({ timeout: 20_000 });
  check(true, 'the reviewer approved it from the mailed link; the history says so');
  say(`screenshot ${await screenshot(r.page, 'waiver-4-approved', { folder: 'e2e', fullPage: false })}`);
  checks.clean(r, "the reviewer's pages");
  await r.context.close();

  // 4. The designer is told, runs the netlist again, and the finding is waived there.
  const told = await smtp.waitFor((m) => m.to.includes(designer.email) && /was approved/.test(m.subject), 30_000);
  check(true, `the designer was mailed “${told.subject}”`);
  const againId = await submitThroughForm(page, blockId, 'Again, after the waiver was approved.');
  await waitForRun(page, againId);
  const again = await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${againId}/findings?rule=${encodeURIComponent(finding!.ruleId)}&pageSize=100`);
  const same = again.items.find((f) => f.fingerprint === finding!.fingerprint);
  check(same?.status === 'waived', `the new run's finding with the same fingerprint is ${same?.status ?? 'missing'}`);
  if (same) {
    await page.goto(`/runs/${againId}?tab=findings&finding=${same.id}`);
    await page.getByRole('complementary', { name: 'Selected finding' }).locator('[data-waiver-state="waived"]').waitFor({ timeout: 20_000 });
    check(true, 'the new run shows the finding as waived');
    say(`screenshot ${await screenshot(page, 'waiver-5-waived-in-rerun', { folder: 'e2e', fullPage: false })}`);
  }
  checks.clean(d, "the designer's pages");
  await d.context.close();
  return { blockId };
}
