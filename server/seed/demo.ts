// The demo scenario: an invented chip team, its blocks, one user per role, and the
// built-in rule deck as the team's first published version. Idempotent: what
// exists is kept (a demo user's changed password included), what is missing is made.

import type { Sequelize } from 'sequelize';
import { defaultDeck } from '../../rules/default-deck';
import type { Role } from '../../shared/roles';
import { Block, RuleDeck, RuleDeckVersion, Team, User } from '../db/models';
import { hashPassword } from '../services/passwords';
import { queueDemoRuns } from './demo-runs';

export const DEMO_TEAM = 'Marrowgate Silicon · Lantern core';

export const DEMO_USERS: { email: string; name: string; roles: Role[]; password: string }[] = [
  { email: 'ines.varga@marrowgate.example', name: 'Ines Varga', roles: ['designer'], password: 'lantern-designer' },
  { email: 'tomas.okafor@marrowgate.example', name: 'Tomas Okafor', roles: ['methodology'], password: 'lantern-methodology' },
  { email: 'priya.halden@marrowgate.example', name: 'Priya Halden', roles: ['reviewer'], password: 'lantern-reviewer' },
  { email: 'ruth.abernathy@marrowgate.example', name: 'Ruth Abernathy', roles: ['admin'], password: 'lantern-admin' },
];

export const DEMO_BLOCKS: { name: string; description: string }[] = [
  { name: 'lantern-alu-domino', description: 'Dual-rail domino carry chain and sum stage of the Lantern integer unit.' },
  { name: 'lantern-regfile-6r3w', description: 'Six-read, three-write register file bit slice with precharged read bit lines.' },
  { name: 'lantern-tag-compare', description: 'Dynamic match lines of the instruction cache tag comparator.' },
  { name: 'lantern-scan-latches', description: 'Pulsed latches and pass-gate muxes of the scan chain.' },
];

export interface SeedResult {
  teamId: string;
  created: string[];
}

export async function seedDemo(sequelize: Sequelize): Promise<SeedResult> {
  const created: string[] = [];
  const result = await sequelize.transaction(async (transaction) => {
    const [team, teamCreated] = await Team.findOrCreate({ where: { name: DEMO_TEAM }, transaction });
    if (teamCreated) created.push(`team ${team.name}`);

    let deckOwner: User | undefined;
    for (const demo of DEMO_USERS) {
      let user = await User.findOne({ where: { email: demo.email }, transaction });
      if (!user) {
        user = await User.create(
          { email: demo.email, name: demo.name, roles: demo.roles, teamId: team.id, passwordHash: await hashPassword(demo.password), lastSignInAt: null },
          { transaction },
        );
        created.push(`user ${demo.email}`);
      }
      if (demo.roles.includes('methodology')) deckOwner ??= user;
    }

    for (const demo of DEMO_BLOCKS) {
      const [, made] = await Block.findOrCreate({
        where: { teamId: team.id, name: demo.name },
        defaults: { teamId: team.id, name: demo.name, description: demo.description, createdBy: null },
        transaction,
      });
      if (made) created.push(`block ${demo.name}`);
    }

    const deckName = 'Lantern review deck';
    let deck = await RuleDeck.findOne({ where: { teamId: team.id, name: deckName }, transaction });
    if (!deck) {
      deck = await RuleDeck.create(
        {
          teamId: team.id,
          name: deckName,
          description: 'The team deck every Lantern block is checked against.',
          defaultVersionId: null,
          teamDefault: true,
        },
        { transaction },
      );
      const content = { ...defaultDeck(), name: deckName };
      const version = await RuleDeckVersion.create(
        {
          deckId: deck.id,
          version: 1,
          state: 'published',
          content,
          changeNote: 'Started from the Keepwell built-in deck.',
          createdBy: deckOwner?.id ?? null,
          publishedBy: deckOwner?.id ?? null,
          publishedAt: new Date(),
          parentVersionId: null,
        },
        { transaction },
      );
      deck.defaultVersionId = version.id;
      await deck.save({ transaction });
      created.push(`deck ${deckName} v1`);
    }
    return { teamId: team.id, created };
  });
  // The demo netlists, stored and queued as runs of the demo designer (server/seed/demo-runs.ts).
  const designer = await User.findOne({ where: { email: DEMO_USERS.find((u) => u.roles.includes('designer'))!.email } });
  if (designer) result.created.push(...(await queueDemoRuns(sequelize, result.teamId, designer.id, DEMO_BLOCKS.map((b) => b.name))));
  return result;
}

export function demoSignInText(publicUrl: string): string {
  const width = Math.max(...DEMO_USERS.map((u) => u.email.length));
  return [
    `Demo sign-ins for ${DEMO_TEAM} (${publicUrl}):`,
    ...DEMO_USERS.map((u) => `  ${u.roles.join(', ').padEnd(12)} ${u.email.padEnd(width)}  ${u.password}`),
  ].join('\n');
}
