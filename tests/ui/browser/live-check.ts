// The built client against a running Keepwell server (npm start): sign-in, the admin pages,
// an invitation followed from the outbox to a new signed-in user, and a new block. It creates
// an invited user and a block in the demo team each time it runs, so use it on the demo
// database only. Screenshots land in test-artifacts/live/.
// Run: KEEPWELL_URL=http://127.0.0.1:5180 npx tsx tests/ui/browser/live-check.ts

import type { Page } from 'playwright-core';
import { DEMO_USERS } from '../../../server/seed/demo';
import { launchBrowser, openPage, screenshot, type GuardedPage } from '../../support/browser';

const base = (process.env.KEEPWELL_URL ?? 'http://127.0.0.1:5180').replace(/\/$/, '');
const admin = DEMO_USERS.find((u) => u.roles.includes('admin'))!;
const problems: string[] = [];

function check(ok: boolean, what: string) {
  console.log(`${ok ? '  ok  ' : '  FAIL'} ${what}`);
  if (!ok) problems.push(what);
}

function clean(g: GuardedPage, step: string) {
  // A refused sign-in and the signed-out session probe answer 401 by design.
  const errors = g.errors.filter((e) => !(/status of 401/.test(e.text) && /\/api\/auth\/(me|login)$/.test(e.url)));
  check(errors.length === 0, `${step}: no page errors${errors.length ? ` (${errors.map((e) => e.text).join(' | ')})` : ''}`);
  check(g.remoteRequests.length === 0, `${step}: nothing fetched from outside the machine`);
}

async function signIn(page: Page, email: string, password: string) {
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

const stamp = Date.now().toString(36);
const invitee = { name: `Check Person ${stamp}`, email: `check.${stamp}@marrowgate.example`, password: `a fresh passphrase ${stamp}` };

const browser = await launchBrowser();
try {
  console.log(`Against ${base}`);
  const adminPage = await openPage(browser, { baseURL: base });
  const page = adminPage.page;
  await page.goto('/');
  await page.getByRole('heading', { name: 'Sign in to Keepwell' }).waitFor();
  check(new URL(page.url()).pathname === '/sign-in', 'signed out: / leads to sign-in');

  await signIn(page, admin.email, 'not the password');
  await page.getByRole('alert').waitFor();
  check((await page.getByRole('alert').textContent())!.includes('do not match an active account'), 'wrong password: the server’s 401 is shown as a refusal');
  await screenshot(page, 'sign-in-refused', { folder: 'live' });

  await page.getByLabel('Password').fill(admin.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Overview' }).waitFor();
  await page.locator('main a[href^="/blocks/"]').first().waitFor();
  check((await page.getByRole('link', { name: 'Users & invitations' }).count()) === 1, 'admin: Administration shown');
  await screenshot(page, 'overview-admin', { folder: 'live' });

  await page.getByRole('link', { name: 'Users & invitations' }).click();
  await page.getByRole('table', { name: 'Team members' }).waitFor();
  for (const u of DEMO_USERS) check((await page.getByText(u.email).count()) === 1, `users: ${u.email} listed`);
  await page.getByRole('button', { name: 'Invite someone' }).click();
  await page.getByLabel('Name').fill(invitee.name);
  await page.getByRole('form', { name: 'Invite someone' }).getByLabel('E-mail address').fill(invitee.email);
  await page.getByRole('button', { name: 'Send invitation' }).click();
  await page.getByText('Invitation sent').waitFor();
  await page.getByText(invitee.email).first().waitFor();
  await screenshot(page, 'admin-users', { folder: 'live' });

  await page.getByRole('link', { name: 'outbox', exact: true }).click();
  await page.getByRole('table').waitFor();
  await page.getByText(invitee.email).first().waitFor();
  await screenshot(page, 'outbox', { folder: 'live' });
  await page.getByRole('row', { name: new RegExp(invitee.email.replace(/\./g, '\\.')) }).getByRole('link').click();
  await page.locator('pre').waitFor();
  const text = (await page.locator('pre').textContent()) ?? '';
  const link = /https?:\/\/\S+\/accept-invite\?token=\S+/.exec(text)?.[0];
  check(!!link, 'outbox: the invitation carries an accept-invite link');
  await screenshot(page, 'outbox-message', { folder: 'live' });

  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.getByRole('heading', { name: 'Sign in to Keepwell' }).waitFor();
  check((await page.evaluate(() => fetch('/api/auth/me').then((r) => r.status))) === 401, 'sign-out: the server session is gone');
  clean(adminPage, 'admin journey');
  await adminPage.context.close();

  if (link) {
    const newcomer = await openPage(browser, { baseURL: base });
    const np = newcomer.page;
    await np.goto(new URL(link).pathname + new URL(link).search);
    await np.getByRole('heading', { name: 'Join your team on Keepwell' }).waitFor();
    await np.getByLabel('Password', { exact: true }).fill(invitee.password);
    await np.getByLabel('Repeat the password').fill(invitee.password);
    await np.getByRole('button', { name: 'Set password and sign in' }).click();
    await np.getByRole('heading', { name: 'Overview' }).waitFor();
    check((await np.getByText(invitee.name).count()) > 0, 'invitation: accepted and signed in as the new person');
    check((await np.getByRole('link', { name: 'Users & invitations' }).count()) === 0, 'new designer: no Administration');

    await np.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Blocks' }).click();
    await np.getByRole('button', { name: 'New block' }).click();
    const blockName = `check-${stamp}`;
    await np.getByLabel('Name').fill(blockName);
    await np.getByLabel('Description').fill('Made by the client’s live check.');
    await np.getByRole('button', { name: 'Create block' }).click();
    await np.getByRole('heading', { level: 1, name: blockName }).waitFor();
    check(/^\/blocks\/[0-9a-f-]{36}$/.test(new URL(np.url()).pathname), 'new block: its page opens at /blocks/<id>');
    await screenshot(np, 'block-created', { folder: 'live' });
    clean(newcomer, 'newcomer journey');
    await newcomer.context.close();
  }
} finally {
  await browser.close();
}

if (problems.length) {
  console.log(`\n${problems.length} problem(s):\n- ${problems.join('\n- ')}`);
  process.exit(1);
}
console.log('\nThe client works against the running server.');
