// The audit trail: who did what to which subject, per team. Services record an
// event in the same transaction as the change it describes.

import type { Transaction } from 'sequelize';
import type { AuditEvent as AuditEventView } from '../../shared/api/audit';
import { AuditEvent, User } from '../db/models';

export interface AuditInput {
  teamId: string | null;
  actorId: string | null;
  action: string;
  subjectType: string;
  subjectId?: string | null;
  detail?: Record<string, unknown>;
}

export async function recordAudit(input: AuditInput, transaction?: Transaction): Promise<void> {
  await AuditEvent.create(
    {
      teamId: input.teamId,
      actorId: input.actorId,
      action: input.action,
      subjectType: input.subjectType,
      subjectId: input.subjectId ?? null,
      detail: input.detail ?? {},
    },
    { transaction },
  );
}

export async function listAudit(teamId: string, page: number, pageSize: number) {
  const { rows, count } = await AuditEvent.findAndCountAll({
    where: { teamId },
    include: [{ model: User, as: 'actor', attributes: ['id', 'name', 'email'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  const items: AuditEventView[] = rows.map((e) => ({
    id: e.id,
    action: e.action,
    subjectType: e.subjectType,
    subjectId: e.subjectId,
    detail: e.detail,
    actor: e.actor ? { id: e.actor.id, name: e.actor.name, email: e.actor.email } : null,
    createdAt: e.createdAt.toISOString(),
  }));
  return { items, total: count, page, pageSize };
}
