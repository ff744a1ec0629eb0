// The end-to-end journeys of roles, waivers and decks in a real browser (Debian's Chromium
// through playwright-core, nothing allowed off the machine), on a Keepwell of their own with
// the demo seed on a fresh database and a mail catcher in this process:
//
//   roles-journey.ts    each demo user sees only what their roles may do;
//   waiver-journey.ts   upload, progress, a dynamic-node finding in the editor, a waiver asked
//                       for, approved from the mailed link, and seen waived in the next run;
//   deck-journey.ts     a threshold tightened, previewed, published, and reflected in a run.
//
//   npx tsx tests/e2e/journeys.ts        (npm run test:e2e runs it with tests/e2e/review.ts)
//
// Screenshots land in test-artifacts/e2e/.

import { launchBrowser, screenshot } from '../support/browser';
import { deckJourney } from './deck-journey';
import { rolesJourney } from './roles-journey';
import { Checks, startKeepwell } from './support';
import { waiverJourney } from './waiver-journey';

const checks = new Checks('journeys');
const keepwell = await startKeepwell('e2e', { captureMail: true, log: (line) => checks.say(line) });
const browser = await launchBrowser();
// The waiver journey goes first: its run then waits behind the demo's seeded runs, and its
// progress bar is on screen long enough to be watched. The roles journey waits for those runs.
for (const [name, journey] of [
  ['waiver and deck', async () => {
    const { blockId } = await waiverJourney(browser, keepwell.base, keepwell.smtp!, checks, keepwell.holdQueue);
    await deckJourney(browser, keepwell.base, blockId, checks);
  }],
  ['roles', () => rolesJourney(browser, keepwell.base, checks)],
] as const) {
  const started = Date.now();
  try {
    await journey();
  } catch (error) {
    checks.check(false, `the ${name} journey ran to its end (${error instanceof Error ? error.message : String(error)})`);
    // What the pages showed when it stopped.
    let n = 0;
    for (const context of browser.contexts()) for (const page of context.pages()) checks.say(`screenshot ${await screenshot(page, `failure-${name.replace(/\W+/g, '-')}-${++n}`, { folder: 'e2e' })}`);
  }
  checks.say(`${name} journey: ${((Date.now() - started) / 1000).toFixed(0)} s`);
}
await browser.close();
await keepwell.stop();
checks.finish();
