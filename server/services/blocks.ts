// Design blocks of a team.

import { UniqueConstraintError } from 'sequelize';
import type { Block as BlockView } from '../../shared/api/blocks';
import type { AppContext } from '../context';
import { Block } from '../db/models';
import { conflict, notFound } from '../errors';
import { recordAudit } from './audit';

export function blockView(block: Block): BlockView {
  return { id: block.id, name: block.name, description: block.description, createdAt: block.createdAt.toISOString() };
}

export async function listBlocks(teamId: string): Promise<BlockView[]> {
  const blocks = await Block.findAll({ where: { teamId }, order: [['name', 'ASC']] });
  return blocks.map(blockView);
}

/** A block of the caller's team; another team's block is "not found", never "forbidden". */
export async function getBlock(teamId: string, id: string): Promise<Block> {
  const block = await Block.findOne({ where: { id, teamId } });
  if (!block) throw notFound('Block');
  return block;
}

export async function createBlock(
  ctx: AppContext,
  actor: { id: string; teamId: string },
  input: { name: string; description: string },
): Promise<BlockView> {
  try {
    return await ctx.sequelize.transaction(async (transaction) => {
      const block = await Block.create(
        { teamId: actor.teamId, name: input.name, description: input.description, createdBy: actor.id },
        { transaction },
      );
      await recordAudit(
        { teamId: actor.teamId, actorId: actor.id, action: 'block.create', subjectType: 'block', subjectId: block.id, detail: { name: block.name } },
        transaction,
      );
      return blockView(block);
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw conflict(`A block named "${input.name}" already exists.`);
    throw err;
  }
}
