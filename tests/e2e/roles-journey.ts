// Each demo user signs in and sees only what their roles may do: the sidebar's items, and the
// action buttons of the blocks, block, decks, deck, finding and administration pages. What
// should be shown is read from shared/roles.ts, the product's table of who may do what (the
// client only hides; tests/api/permissions.test.ts shows the server refuses anyway, and two
// refusals are tried here from the page's own session too).

import type { Browser } from 'playwright-core';
import type { DeckSummary } from '../../shared/api/decks';
import type { RunView, StoredFinding } from '../../shared/api/runs';
import { can, ROLE_LABELS, type Permission, type Role } from '../../shared/roles';
import { DEMO_USERS } from '../../server/seed/demo';
import { ACCOUNT_NAVIGATION, NAVIGATION } from '../../src/app/navigation';
import { openPage, screenshot } from '../support/browser';
import { apiGet, signIn, until, type Checks } from './support';

/** A demo run that finished with an open finding, and the demo's deck and tag-compare block. */
async function demoFixtures(browser: Browser, base: string) {
  const g = await openPage(browser, { baseURL: base });
  await signIn(g.page, DEMO_USERS.find((u) => u.roles.includes('designer'))!);
  const runs = await until(
    () => apiGet<{ items: RunView[] }>(g.page, '/api/runs?pageSize=50'),
    (r) => r.items.length > 0 && r.items.every((x) => x.state === 'succeeded' || x.state === 'failed'),
    180_000,
    'the demo runs finish',
  );
  let found: { run: RunView; finding: StoredFinding } | null = null;
  for (const run of runs.items.filter((r) => r.state === 'succeeded')) {
    const open = await apiGet<{ items: StoredFinding[] }>(g.page, `/api/runs/${run.id}/findings?status=open&pageSize=1`);
    if (open.items[0]) {
      found = { run, finding: open.items[0] };
      break;
    }
  }
  const { items: blocks } = await apiGet<{ items: { id: string; name: string }[] }>(g.page, '/api/blocks');
  const { items: decks } = await apiGet<{ items: DeckSummary[] }>(g.page, '/api/decks');
  await g.context.close();
  if (!found) throw new Error('no finished demo run has an open finding');
  return { ...found, block: blocks.find((b) => b.name === 'lantern-tag-compare') ?? blocks[0], deck: decks[0] };
}

export async function rolesJourney(browser: Browser, base: string, checks: Checks): Promise<void> {
  const { check, say } = { check: checks.check.bind(checks), say: checks.say.bind(checks) };
  const fx = await demoFixtures(browser, base);
  say(`demo run ${fx.run.id}, open finding ${fx.finding.id} (${fx.finding.ruleId}), block ${fx.block.name}, deck ${fx.deck.name}`);

  for (const user of DEMO_USERS) {
    const roles = user.roles as Role[];
    const who = ROLE_LABELS[roles[0]];
    const may = (p: Permission) => can(roles, p);
    const g = await openPage(browser, { baseURL: base, width: 1440, height: 900 });
    const { page } = g;
    await signIn(page, user);
    await page.getByRole('navigation', { name: 'Main' }).waitFor();

    // The sidebar: an item is there exactly when the role holds its permission (src/app/navigation.ts).
    for (const item of [...NAVIGATION.flatMap((group) => group.items), ...ACCOUNT_NAVIGATION]) {
      const shown = (await page.getByRole('link', { name: item.label, exact: true }).count()) > 0;
      check(shown === may(item.permission), `${who}: sidebar ${shown ? 'shows' : 'hides'} “${item.label}” (${item.permission})`);
    }
    say(`screenshot ${await screenshot(page, `roles-${roles[0]}-overview`, { folder: 'e2e', fullPage: false })}`);

    /** On `path`, once `ready` is visible, the button (or link) named `name` is there exactly when `permission` is held. */
    const action = async (path: string, ready: string, name: string, permission: Permission, kind: 'button' | 'link' = 'button') => {
      await page.goto(path);
      await page.getByText(ready, { exact: false }).first().waitFor({ timeout: 20_000 });
      const shown = (await page.getByRole(kind, { name, exact: true }).count()) > 0;
      check(shown === may(permission), `${who}: ${path.split('?')[0]} ${shown ? 'shows' : 'hides'} “${name}” (${permission})`);
    };
    await action('/blocks', fx.block.name, 'New block', 'block.create');
    await action(`/blocks/${fx.block.id}`, 'Runs', 'Submit a netlist', 'run.submit');
    await action('/decks', fx.deck.name, 'New deck', 'deck.edit');
    await action(`/decks/${fx.deck.id}`, fx.deck.name, `Start a draft from version ${fx.deck.latestPublished!.version}`, 'deck.edit');
    await action(`/runs/${fx.run.id}?tab=findings&finding=${fx.finding.id}`, fx.finding.message, 'Ask to waive', 'waiver.request');
    check(
      ((await page.getByRole('button', { name: 'Waive', exact: true }).count()) > 0) === may('waiver.decide'),
      `${who}: the finding ${may('waiver.decide') ? 'offers' : 'does not offer'} “Waive” (waiver.decide)`,
    );
    say(`screenshot ${await screenshot(page, `roles-${roles[0]}-finding`, { folder: 'e2e', fullPage: false })}`);

    // Administration: the pages themselves say when they are not for this role.
    for (const [path, permission, name] of [
      ['/admin/users', 'user.manage', 'Invite someone'],
      ['/admin/outbox', 'outbox.read', null],
    ] as const) {
      await page.goto(path);
      const refused = page.getByText('Not available with your roles');
      const table = page.getByRole('table');
      await refused.or(table).first().waitFor({ timeout: 20_000 });
      const open = await table.count();
      check((open > 0) === may(permission), `${who}: ${path} ${open > 0 ? 'opens' : 'says it is not for this role'} (${permission})`);
      if (name) check(((await page.getByRole('button', { name }).count()) > 0) === may(permission), `${who}: ${path} ${may(permission) ? 'offers' : 'does not offer'} “${name}”`);
    }

    // Hidden is not enough: the server refuses the same actions from this session.
    for (const [url, permission, data] of [
      ['/api/decks', 'deck.edit', { name: `Deck tried by ${roles[0]}` }],
      ['/api/waivers/direct', 'waiver.decide', { runId: fx.run.id, findingId: fx.finding.id, scope: 'finding', justification: 'tried from the roles journey' }],
    ] as const) {
      const res = await page.request.post(url, { data, headers: { Origin: base } });
      const answered = may(permission) ? res.status() < 300 : res.status() === 403;
      check(answered, `${who}: POST ${url} answers ${res.status()} (${may(permission) ? 'allowed' : 'refused'} by ${permission})`);
    }
    checks.clean(g, `${who}'s pages`);
    await g.context.close();
  }
}
