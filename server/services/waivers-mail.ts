// The messages of the waiver workflow: a request to the team's reviewers, a decision
// or a revocation to the requester, and the warning a week before a waiver expires.
// Each links to the waiver's page, where a reviewer approves in one click after sign-in.

import { REVIEW_CAUTION } from '../../shared/findings';

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function message(subject: string, paragraphs: string[], link: { href: string; label: string }) {
  const kept = paragraphs.filter(Boolean);
  return {
    subject,
    text: `${kept.join('\n\n')}\n\n${link.label}: ${link.href}\n`,
    html: [
      '<div style="font-family: sans-serif; font-size: 15px; line-height: 1.5; color: #1d232b">',
      ...kept.map((p) => `<p>${escape(p).replace(/\n/g, '<br>')}</p>`),
      `<p><a href="${escape(link.href)}">${escape(link.label)}</a></p>`,
      '</div>',
    ].join('\n'),
  };
}

export interface WaiverMailSubject {
  ruleId: string;
  cell: string | null;
  block: string | null;
  scopeLabel: string;
  justification: string;
  link: string;
}

const where = (w: WaiverMailSubject) => `${w.ruleId} in ${w.cell ?? 'every cell'}${w.block ? ` (block ${w.block})` : ''}`;

export function waiverRequestedMail(input: WaiverMailSubject & { name: string; requester: string; expiresOn: string | null }) {
  return message(
    `Keepwell: waiver requested for ${input.ruleId} in ${input.cell ?? 'a cell'}`,
    [
      `Hello ${input.name},`,
      `${input.requester} asks to waive ${where(input)}, scope: ${input.scopeLabel}.`,
      `Justification:\n${input.justification}`,
      input.expiresOn ? `Asked to hold until ${input.expiresOn}.` : 'No expiry was asked for.',
      REVIEW_CAUTION,
    ],
    { href: input.link, label: 'Review the request' },
  );
}

export function waiverDecidedMail(input: WaiverMailSubject & { name: string; decider: string; decision: 'approved' | 'rejected'; comment: string }) {
  return message(
    `Keepwell: your waiver for ${input.ruleId} was ${input.decision}`,
    [
      `Hello ${input.name},`,
      `${input.decider} ${input.decision} your waiver of ${where(input)}.`,
      input.comment ? `Comment:\n${input.comment}` : '',
      input.decision === 'approved' ? 'Findings it covers now show as waived in this and later runs.' : 'The finding stays open.',
    ],
    { href: input.link, label: 'Open the waiver' },
  );
}

export function waiverRevokedMail(input: WaiverMailSubject & { name: string; revoker: string; reason: string }) {
  return message(
    `Keepwell: the waiver for ${input.ruleId} was revoked`,
    [`Hello ${input.name},`, `${input.revoker} revoked the waiver of ${where(input)}.`, `Reason:\n${input.reason}`, 'The findings it covered are open again.'],
    { href: input.link, label: 'Open the waiver' },
  );
}

export function waiverExpiringMail(input: WaiverMailSubject & { name: string; expiresOn: string }) {
  return message(
    `Keepwell: the waiver for ${input.ruleId} expires on ${input.expiresOn}`,
    [
      `Hello ${input.name},`,
      `The waiver of ${where(input)} expires on ${input.expiresOn}. From then on, the findings it covers show as lapsed until a new waiver is granted or the circuit is fixed.`,
      `Justification:\n${input.justification}`,
    ],
    { href: input.link, label: 'Open the waiver' },
  );
}
