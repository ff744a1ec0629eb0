// What the admin's outbox screen reads: the team's outgoing mail and its delivery state.
// In production the one-time tokens in reset and invitation links are hidden: an
// administrator must not be able to take over a member's account from the outbox.

import type { OutboxMessage } from '../../shared/api/admin';
import { MailMessage } from '../db/models';
import { notFound } from '../errors';

function summary(m: MailMessage) {
  return {
    id: m.id,
    to: m.to,
    subject: m.subject,
    status: m.status,
    error: m.error,
    attempts: m.attempts,
    createdAt: m.createdAt.toISOString(),
    sentAt: m.sentAt ? m.sentAt.toISOString() : null,
  };
}

export async function listOutbox(teamId: string, page: number, pageSize: number) {
  const { rows, count } = await MailMessage.findAndCountAll({
    where: { teamId },
    attributes: { exclude: ['text', 'html'] },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  return { items: rows.map(summary), total: count, page, pageSize };
}

const LINK_TOKEN = /([?&]token=)[A-Za-z0-9_%-]+/g;

export function hideLinkTokens(body: string): string {
  return body.replace(LINK_TOKEN, '$1(hidden)');
}

export async function getOutboxMessage(teamId: string, id: string, options: { hideTokens: boolean }): Promise<OutboxMessage> {
  const m = await MailMessage.findOne({ where: { id, teamId } });
  if (!m) throw notFound('Message');
  const show = options.hideTokens ? hideLinkTokens : (body: string) => body;
  return { ...summary(m), text: show(m.text), html: m.html === null ? null : show(m.html) };
}
