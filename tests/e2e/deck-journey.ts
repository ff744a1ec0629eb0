// The methodology owner tightens a threshold of the team deck and the next run reflects it:
// a draft from the published version, the keeper-ratio rule's weakest acceptable keeper raised
// from 0.03 to 0.1 of the evaluation current, the preview on the team's newest netlist, publish
// as the version new runs use, and a run of the journey's netlist checked against it.
//
// The expected change is computed here by the checker in this process on the same netlist with
// the two decks (the built-in deck, which the demo deck's version 1 is, and the same with the
// new threshold): the preview and the new run must both agree with it.

import fs from 'node:fs';
import type { Browser } from 'playwright-core';
import type { DeckSummary } from '../../shared/api/decks';
import type { RunView, StoredFinding } from '../../shared/api/runs';
import { readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { findRule } from '../../rules/registry';
import { DEMO_USERS } from '../../server/seed/demo';
import { openPage, screenshot } from '../support/browser';
import { apiGet, signIn, type Checks } from './support';
import { JOURNEY_NETLIST, submitThroughForm, waitForRun } from './waiver-journey';

const RULE = 'dynamic.keeper-ratio';
const PARAM = 'minRatio';
const TIGHTER = 0.1;

function keeperFindings(minRatio: number) {
  const deck = defaultDeck();
  deck.rules[RULE] = { ...deck.rules[RULE], params: { ...deck.rules[RULE].params, [PARAM]: minRatio } };
  const text = fs.readFileSync(JOURNEY_NETLIST.path, 'utf8');
  const design = readDesign({ [JOURNEY_NETLIST.name]: text }, { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies });
  return checkDesign(design, deck).findings.filter((f) => f.ruleId === RULE);
}

export async function deckJourney(browser: Browser, base: string, blockId: string, checks: Checks): Promise<void> {
  const check = checks.check.bind(checks);
  const say = checks.say.bind(checks);
  const owner = DEMO_USERS.find((u) => u.roles.includes('methodology'))!;
  const rule = findRule(RULE)!;
  const field = (rule.params.shape as Record<string, { meta(): { label: string } | undefined }>)[PARAM].meta()!.label;
  const before = keeperFindings(defaultDeck().rules[RULE].params![PARAM] as number);
  const after = keeperFindings(TIGHTER);
  say(`in this process: ${before.length} ${RULE} finding(s) with ${PARAM} ${defaultDeck().rules[RULE].params![PARAM]}, ${after.length} with ${TIGHTER}`);
  if (!check(after.length > before.length, `the tighter threshold adds ${RULE} findings on ${JOURNEY_NETLIST.name} (checker in this process)`)) return;

  const g = await openPage(browser, { baseURL: base, width: 1440, height: 960 });
  const { page } = g;
  await signIn(page, owner);
  const { items: decks } = await apiGet<{ items: DeckSummary[] }>(page, '/api/decks');
  const deck = decks.find((x) => x.teamDefault)!;

  // A draft from the published version.
  await page.goto('/decks');
  await page.getByRole('link', { name: deck.name }).first().click();
  await page.getByRole('button', { name: `Start a draft from version ${deck.latestPublished!.version}` }).click();
  await page.waitForURL((u) => /\/versions\/[0-9a-f-]{36}$/.test(u.pathname) && !u.pathname.endsWith(deck.latestPublished!.id));
  const draftVersion = deck.latestPublished!.version + 1;
  check(true, `the owner started draft version ${draftVersion} of ${deck.name}`);

  // The threshold, in the rule's own section of the form.
  const section = page.getByRole('region', { name: rule.meta.title });
  const input = section.getByLabel(field);
  await input.waitFor();
  check((await input.inputValue()).trim() !== '', `the ${PARAM} field shows the current value (${await input.inputValue()})`);
  await input.fill(String(TIGHTER));
  await section.getByRole('button', { name: `Save ${rule.meta.title.toLowerCase()}` }).click();
  await section.getByRole('button', { name: /^Save / }).waitFor({ state: 'detached', timeout: 20_000 });
  say(`screenshot ${await screenshot(page, 'deck-1-threshold', { folder: 'e2e', fullPage: false })}`);
  const saved = await apiGet<{ content: { rules: Record<string, { params?: Record<string, number> }> } }>(page, new URL(page.url()).pathname.replace('/decks/', '/api/decks/'));
  check(saved.content.rules[RULE].params?.[PARAM] === TIGHTER, `the draft holds ${PARAM} = ${saved.content.rules[RULE].params?.[PARAM]}`);

  // The preview on the team's newest netlist (the journey block's, uploaded by the waiver journey).
  await page.getByRole('tab', { name: 'What would change' }).click();
  await page.getByRole('button', { name: 'Run the preview' }).click();
  const added = page.getByRole('region', { name: 'New findings' });
  await added.waitFor({ timeout: 120_000 });
  const heading = (await added.getByRole('heading').textContent()) ?? '';
  const shownAdded = Number(/\((\d+)\)/.exec(heading)?.[1] ?? NaN);
  check(shownAdded === after.length - before.length, `the preview lists ${shownAdded} new findings; the checker in this process adds ${after.length - before.length}`);
  check((await added.getByText(RULE).count()) === shownAdded, `every new finding of the preview is a ${RULE} finding`);
  say(`screenshot ${await screenshot(page, 'deck-2-preview', { folder: 'e2e', fullPage: true })}`);

  // Publish, as the version new runs use.
  await page.getByRole('button', { name: 'Publish…' }).click();
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('Change note').fill(`Keepers weaker than ${TIGHTER} of the evaluation current are reported (was 0.03).`);
  const makeDefault = dialog.getByLabel('Use this version for new runs of this deck');
  if (!(await makeDefault.isChecked())) await makeDefault.check();
  say(`screenshot ${await screenshot(page, 'deck-3-publish', { folder: 'e2e', fullPage: false })}`);
  await dialog.getByRole('button', { name: `Publish version ${draftVersion}` }).click();
  await dialog.waitFor({ state: 'detached', timeout: 20_000 });
  const published = (await apiGet<{ items: DeckSummary[] }>(page, '/api/decks')).items.find((x) => x.id === deck.id)!;
  check(published.defaultVersion?.version === draftVersion, `new runs of ${deck.name} use version ${published.defaultVersion?.version}`);

  // A new run of the same netlist reflects it.
  const runId = await submitThroughForm(page, blockId, `Checked against version ${draftVersion} of the deck.`);
  const run: RunView = await waitForRun(page, runId);
  check(run.deck.version === draftVersion, `the new run was checked against version ${run.deck.version}`);
  const { items } = await apiGet<{ items: StoredFinding[] }>(page, `/api/runs/${runId}/findings?rule=${RULE}&pageSize=100`);
  check(items.length === after.length, `the new run has ${items.length} ${RULE} findings, as the checker in this process (${after.length})`);
  check(items.filter((f) => f.limit?.value === TIGHTER).length === after.length - before.length, `the findings the new threshold adds quote its limit, ${TIGHTER}`);
  await page.goto(`/runs/${runId}?tab=findings&rule=${RULE}`);
  await page.locator('tr[data-finding-id]').first().waitFor();
  say(`screenshot ${await screenshot(page, 'deck-4-new-run', { folder: 'e2e', fullPage: false })}`);
  checks.clean(g, "the methodology owner's pages");
  await g.context.close();
}
