// The demo's waivers: one a reviewer granted, with a bound and an expiry, and one a
// designer asked for that waits in the reviewers' queue, so that a new user sees both
// ends of the waiver flow. They can only be made once the demo runs have findings:
// `npm run seed` makes them after its worker has drained the queue, `npm start` once
// its worker has finished the demo runs. Made through the waiver service itself (its
// audit events and the reviewers' mail included); a waiver already made for the same
// rule and cell, in any state, is left alone, so a reviewer's later decision stands.

import { QueryTypes, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/roles';
import type { Config } from '../config';
import { createOutbox, type AppContext } from '../context';
import { createWaiver } from '../services/waivers';
import { DEMO_TEAM, DEMO_USERS } from './demo';

type Ctx = Pick<AppContext, 'sequelize' | 'outbox' | 'config'>;

interface DemoWaiver {
  block: string;
  ruleId: string;
  cell: string;
  /** Who makes it: a reviewer waives directly, a designer asks. */
  by: Extract<Role, 'reviewer' | 'designer'>;
  justification: string;
  boundValue?: number;
  expiresInDays?: number;
}

export const DEMO_WAIVERS: DemoWaiver[] = [
  {
    block: 'lantern-scan-latches',
    ruleId: 'chain.non-restoring',
    cell: 'lsc_obsmux',
    by: 'reviewer',
    justification:
      'The observation mux is only used while scan shifts at 25 MHz. The four-deep path from d0 to lat was simulated at every corner in the shift-mode bench and settles with 40 % of the cycle to spare. Waived while the chain stays at most four devices deep.',
    boundValue: 4,
    expiresInDays: 180,
  },
  {
    block: 'lantern-alu-domino',
    ruleId: 'dynamic.keeper-ratio',
    cell: 'lantern_alu_slice',
    by: 'designer',
    justification:
      'The carry-3 keeper was made stronger on purpose after the leakage review at ff-hot. The evaluate stack was widened with it, and the slow-corner evaluation still finishes with the keeper fighting it. Asking for a waiver until the next resize of the carry chain.',
  },
];

/** Make the demo waivers whose findings exist and that are not made yet. Returns what was made. */
export async function seedDemoWaivers(ctx: Ctx, now: Date = new Date()): Promise<string[]> {
  const made: string[] = [];
  for (const demo of DEMO_WAIVERS) {
    const person = DEMO_USERS.find((u) => u.roles.includes(demo.by));
    if (!person) continue;
    const [actor] = await ctx.sequelize.query<{ id: string; team_id: string }>(
      `select u.id, u.team_id from users u join teams t on t.id = u.team_id where u.email = :email and t.name = :team`,
      { replacements: { email: person.email, team: DEMO_TEAM }, type: QueryTypes.SELECT },
    );
    if (!actor) continue;
    const [existing] = await ctx.sequelize.query<{ id: string }>(`select id from waivers where team_id = :teamId and rule_id = :ruleId and cell = :cell limit 1`, {
      replacements: { teamId: actor.team_id, ruleId: demo.ruleId, cell: demo.cell },
      type: QueryTypes.SELECT,
    });
    if (existing) continue;
    // The finding in the block's latest finished run.
    const [finding] = await ctx.sequelize.query<{ id: string | number; run_id: string }>(
      `select f.id, f.run_id from findings f join runs r on r.id = f.run_id join blocks b on b.id = r.block_id
       where b.team_id = :teamId and b.name = :block and r.state = 'succeeded' and f.rule_id = :ruleId and f.cell = :cell
       order by r.created_at desc, f.id limit 1`,
      { replacements: { teamId: actor.team_id, block: demo.block, ruleId: demo.ruleId, cell: demo.cell }, type: QueryTypes.SELECT },
    );
    if (!finding) continue;
    const expiresAt = demo.expiresInDays ? new Date(now.getTime() + demo.expiresInDays * 86_400_000).toISOString().slice(0, 10) : null;
    await createWaiver(
      ctx,
      { id: actor.id, teamId: actor.team_id },
      { runId: finding.run_id, findingId: Number(finding.id), scope: 'finding', justification: demo.justification, expiresAt, boundValue: demo.boundValue ?? null },
      demo.by === 'reviewer',
    );
    made.push(`${demo.by === 'reviewer' ? 'waiver' : 'waiver request'} on ${demo.ruleId} in ${demo.cell}`);
  }
  return made;
}

/** Whether the demo blocks still have runs waiting or running. */
export async function demoRunsPending(ctx: Pick<AppContext, 'sequelize'>): Promise<boolean> {
  const [{ open }] = await ctx.sequelize.query<{ open: number }>(
    `select cast(count(*) as integer) as open from runs r join teams t on t.id = r.team_id where t.name = :team and r.state in ('queued', 'running')`,
    { replacements: { team: DEMO_TEAM }, type: QueryTypes.SELECT },
  );
  return open > 0;
}

/**
 * Wait (polling) until the demo runs are finished, then make the demo waivers on the caller's database (its models
 * bound). For the start and seed scripts; never throws (a demo without waivers is still a demo), reports through `say`.
 * Mail goes to the outbox table, which the web server's outbox delivers.
 */
export async function seedDemoWaiversWhenReady(config: Config, sequelize: Sequelize, say: (line: string) => void, timeoutMs = 15 * 60_000): Promise<void> {
  try {
    const ctx = { config, sequelize, outbox: createOutbox(config, sequelize) };
    const deadline = Date.now() + timeoutMs;
    while ((await demoRunsPending(ctx)) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 2000));
    const made = await seedDemoWaivers(ctx);
    if (made.length) say(`demo data: ${made.join('; ')}`);
  } catch (err) {
    say(`demo waivers not made: ${err instanceof Error ? err.message : String(err)}`);
  }
}
