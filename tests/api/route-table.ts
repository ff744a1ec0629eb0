// Every API route and the permission it needs, for the table-driven check in
// permissions.test.ts. Adding a route? Append one entry here: the test then tries
// it as every role and as nobody, and expects 401 for nobody, 403 for each role
// that shared/roles.ts PERMISSIONS does not grant, and neither for the others.
//
// `path` and `body` may create what the route needs (a block, a run, …) through
// the fixture: they run once per attempt, so a route that creates something can
// be given a fresh name each time.

import crypto from 'node:crypto';
import type { Permission } from '../../shared/roles';
import type { Team } from '../../server/db/models';
import { FindingRow, MailMessage, Run, Waiver } from '../../server/db/models';
import { createUser, uniqueEmail, type CreatedUser, type TestEnv } from './helpers';
import { defaultDeck } from '../../rules/default-deck';
import { INVERTER_NETLIST, makeDeck, makeNetlist, type DeckFixture } from './decks-fixtures';

export interface RouteFixture {
  env: TestEnv;
  /** The team every attempting user belongs to. */
  team: Team;
  /** A block of that team. */
  blockId: string;
  /** A team member the admin routes may change. */
  member: CreatedUser;
  /** An outbox message of the team. */
  messageId: string;
}

export interface RouteCase {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete';
  path: string | ((fx: RouteFixture) => string | Promise<string>);
  /** `signed-in`: any signed-in user; `public`: no sign-in needed (not tried for 401). */
  permission: Permission | 'signed-in' | 'public';
  body?: (fx: RouteFixture) => object | Promise<object>;
}

const unique = (label: string) => `${label}-${crypto.randomBytes(4).toString('hex')}`;

export const ROUTES: RouteCase[] = [
  { method: 'get', path: '/api/health', permission: 'public' },
  { method: 'get', path: '/api/auth/me', permission: 'signed-in' },

  { method: 'get', path: '/api/admin/users', permission: 'user.manage' },
  {
    method: 'post',
    path: '/api/admin/invitations',
    permission: 'user.manage',
    body: () => ({ email: uniqueEmail('invitee'), name: 'Invited Person', roles: ['designer'] }),
  },
  { method: 'patch', path: (fx) => `/api/admin/users/${fx.member.user.id}`, permission: 'user.manage', body: () => ({ disabled: false }) },
  { method: 'get', path: '/api/admin/outbox', permission: 'outbox.read' },
  { method: 'get', path: (fx) => `/api/admin/outbox/${fx.messageId}`, permission: 'outbox.read' },

  { method: 'get', path: '/api/blocks', permission: 'design.read' },
  { method: 'post', path: '/api/blocks', permission: 'block.create', body: () => ({ name: unique('block'), description: 'made by the permission table' }) },
  { method: 'get', path: (fx) => `/api/blocks/${fx.blockId}`, permission: 'design.read' },

  { method: 'get', path: '/api/audit', permission: 'audit.read' },

  // Rule decks: each attempt gets fresh decks, so changing routes can succeed once per role.
  { method: 'get', path: '/api/decks', permission: 'design.read' },
  { method: 'post', path: '/api/decks', permission: 'deck.edit', body: () => ({ name: unique('deck') }) },
  { method: 'get', path: async (fx) => `/api/decks/${(await makeDeck(fx.team.id)).deck.id}`, permission: 'design.read' },
  {
    method: 'get',
    path: async (fx) => {
      const { published, draft } = await makeDeck(fx.team.id, { draft: true });
      return `/api/decks/diff?from=${published.id}&to=${draft!.id}`;
    },
    permission: 'design.read',
  },
  { method: 'post', path: async (fx) => `/api/decks/${(await makeDeck(fx.team.id)).deck.id}/drafts`, permission: 'deck.edit', body: () => ({}) },
  { method: 'get', path: async (fx) => deckVersionPath(await makeDeck(fx.team.id)), permission: 'design.read' },
  {
    method: 'patch',
    path: async (fx) => deckDraftPath(await makeDeck(fx.team.id, { draft: true })),
    permission: 'deck.edit',
    body: () => ({ lockVersion: 0, changes: [{ op: 'replace', path: '/slowestClockPeriod', value: 200e-9 }] }),
  },
  {
    method: 'put',
    path: async (fx) => `${deckDraftPath(await makeDeck(fx.team.id, { draft: true }))}/content`,
    permission: 'deck.edit',
    body: () => ({ lockVersion: 0, content: { ...defaultDeck(), scale: 1e-6 } }),
  },
  { method: 'delete', path: async (fx) => deckDraftPath(await makeDeck(fx.team.id, { draft: true })), permission: 'deck.edit' },
  {
    method: 'post',
    path: async (fx) => `${deckDraftPath(await makeDeck(fx.team.id, { draft: true }))}/publish`,
    permission: 'deck.publish',
    body: () => ({ lockVersion: 0, changeNote: 'published by the permission table' }),
  },
  { method: 'post', path: async (fx) => `${deckVersionPath(await makeDeck(fx.team.id))}/default`, permission: 'deck.publish', body: () => ({}) },
  { method: 'get', path: async (fx) => `${deckVersionPath(await makeDeck(fx.team.id))}/export`, permission: 'design.read' },
  {
    method: 'post',
    path: async (fx) => {
      await makeNetlist(fx.team.id, fx.blockId, { 'top.sp': INVERTER_NETLIST });
      return `${deckDraftPath(await makeDeck(fx.team.id, { draft: true }))}/preview`;
    },
    permission: 'deck.edit',
    body: () => ({}),
  },
  { method: 'get', path: '/api/rules', permission: 'design.read' },

  // Runs and uploads. POST /api/uploads (multipart) and POST /api/runs/:id/cancel (own runs only) are tried by role in runs.test.ts.
  { method: 'get', path: '/api/runs', permission: 'design.read' },
  {
    method: 'post',
    path: '/api/runs',
    permission: 'run.submit',
    body: async (fx) => {
      await makeDeck(fx.team.id);
      return { netlistId: (await makeNetlist(fx.team.id, fx.blockId, { 'top.sp': INVERTER_NETLIST })).id, note: 'submitted by the permission table' };
    },
  },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeFinishedRun(fx)).id}`, permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeFinishedRun(fx)).id}/findings`, permission: 'design.read' },
  {
    method: 'get',
    path: async (fx) => {
      const run = await makeFinishedRun(fx);
      const finding = await FindingRow.create({
        runId: run.id, ruleId: 'device.implausible-size', severity: 'error', message: 'fixture finding', file: 'top.sp', line: 3, column: 1,
        cell: 'tinv', nets: [], devices: ['Mp'], instances: 1, measured: null, limit: null, fingerprint: '00000000000001', corner: null, plot: null,
      });
      return `/api/runs/${run.id}/findings/${finding.id}`;
    },
    permission: 'design.read',
  },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeFinishedRun(fx)).id}/files`, permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeFinishedRun(fx)).id}/file?path=top.sp`, permission: 'design.read' },
  {
    method: 'get',
    path: async (fx) => `/api/runs/${(await makeFinishedRun(fx)).id}/compare/${(await makeFinishedRun(fx)).id}`,
    permission: 'design.read',
  },
  { method: 'get', path: async (fx) => `/api/uploads/${(await makeNetlist(fx.team.id, fx.blockId, { 'top.sp': INVERTER_NETLIST })).id}`, permission: 'design.read' },

  // Waivers: each attempt gets a fresh finding or waiver, so changing routes can succeed once per role.
  { method: 'get', path: '/api/waivers', permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/waivers/${(await makeWaiver(fx, 'approved')).id}`, permission: 'design.read' },
  {
    method: 'get',
    path: async (fx) => {
      const { run, finding } = await makeRunWithFinding(fx);
      return `/api/waivers/for-finding?runId=${run.id}&findingId=${finding.id}`;
    },
    permission: 'design.read',
  },
  { method: 'post', path: '/api/waivers', permission: 'waiver.request', body: waiverRequestBody },
  { method: 'post', path: '/api/waivers/direct', permission: 'waiver.decide', body: waiverRequestBody },
  { method: 'post', path: async (fx) => `/api/waivers/${(await makeWaiver(fx, 'requested')).id}/approve`, permission: 'waiver.decide', body: () => ({ comment: 'route table' }) },
  { method: 'post', path: async (fx) => `/api/waivers/${(await makeWaiver(fx, 'requested')).id}/reject`, permission: 'waiver.decide', body: () => ({ comment: 'route table' }) },
  { method: 'post', path: async (fx) => `/api/waivers/${(await makeWaiver(fx, 'approved')).id}/revoke`, permission: 'waiver.revoke', body: () => ({ reason: 'route table' }) },
  // POST /api/waivers/:id/withdraw takes the caller's own pending request: tried by role in waivers.test.ts.

  // A finished run's hand-off: review report (JSON, PDF), findings CSV, SARIF.
  { method: 'get', path: async (fx) => `/api/runs/${(await makeRunWithFinding(fx)).run.id}/report`, permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeRunWithFinding(fx)).run.id}/report.pdf`, permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeRunWithFinding(fx)).run.id}/findings.csv`, permission: 'design.read' },
  { method: 'get', path: async (fx) => `/api/runs/${(await makeRunWithFinding(fx)).run.id}/sarif`, permission: 'design.read' },

  // Personal API tokens. POST /api/tokens/:id/revoke takes the caller's own token: tried by role in tokens.test.ts.
  { method: 'get', path: '/api/tokens', permission: 'token.manage' },
  { method: 'post', path: '/api/tokens', permission: 'token.manage', body: () => ({ name: unique('token'), scope: 'read' }) },
];

/** A succeeded run with one finding of a fingerprint no other attempt uses. */
async function makeRunWithFinding(fx: RouteFixture) {
  const run = await makeFinishedRun(fx);
  const finding = await FindingRow.create({
    runId: run.id, ruleId: 'device.implausible-size', severity: 'error', message: 'fixture finding', file: 'top.sp', line: 3, column: 1,
    cell: 'tinv', nets: [], devices: ['Mp'], instances: 1, measured: null, limit: null, fingerprint: crypto.randomBytes(7).toString('hex'), corner: null, plot: null,
  });
  return { run, finding };
}

async function waiverRequestBody(fx: RouteFixture) {
  const { run, finding } = await makeRunWithFinding(fx);
  return { runId: run.id, findingId: finding.id, scope: 'finding', justification: 'asked for by the permission table' };
}

async function makeWaiver(fx: RouteFixture, state: 'requested' | 'approved'): Promise<Waiver> {
  const { run, finding } = await makeRunWithFinding(fx);
  return Waiver.create({
    teamId: fx.team.id, blockId: fx.blockId, ruleId: finding.ruleId, cell: finding.cell, fingerprint: finding.fingerprint, scope: 'finding',
    justification: 'made by the permission table', state, requestedBy: fx.member.user.id, decidedBy: null, decisionComment: null,
    decidedAt: state === 'approved' ? new Date() : null, expiresAt: null, bound: null, sourceRunId: run.id, sourceFindingId: finding.id,
  });
}

/** A succeeded run (no findings) of the fixture's block, made through the models. */
async function makeFinishedRun(fx: RouteFixture): Promise<Run> {
  const { published } = await makeDeck(fx.team.id);
  const netlist = await makeNetlist(fx.team.id, fx.blockId, { 'top.sp': INVERTER_NETLIST });
  return Run.create({
    teamId: fx.team.id,
    blockId: fx.blockId,
    netlistId: netlist.id,
    deckVersionId: published.id,
    submittedBy: fx.member.user.id,
    state: 'succeeded',
    progress: null,
    error: null,
    summary: null,
    startedAt: new Date(),
    finishedAt: new Date(),
  });
}

const deckVersionPath = (d: DeckFixture) => `/api/decks/${d.deck.id}/versions/${d.published.id}`;
const deckDraftPath = (d: DeckFixture) => `/api/decks/${d.deck.id}/versions/${d.draft!.id}`;

export async function makeRouteFixture(env: TestEnv, team: Team, blockId: string): Promise<RouteFixture> {
  const member = await createUser({ team, roles: ['designer'] });
  const message = await MailMessage.create({
    teamId: team.id,
    to: member.email,
    subject: 'fixture message',
    text: 'fixture',
    html: null,
    status: 'sent',
    error: null,
    sentAt: new Date(),
  });
  return { env, team, blockId, member, messageId: message.id };
}
