// The message a submitter gets when their run ends: how it ended, the counts, and the link.

import { REVIEW_CAUTION, type CheckSummary } from '../../shared/findings';
import type { RunState } from '../../shared/api/runs';

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

export interface RunEndedInput {
  name: string;
  block: string;
  state: Extract<RunState, 'succeeded' | 'failed' | 'cancelled'>;
  link: string;
  summary?: CheckSummary | null;
  error?: string | null;
  cancelledBy?: string | null;
}

export function runEndedMail(input: RunEndedInput) {
  const s = input.summary;
  const counts = s ? `${plural(s.errors, 'error')}, ${plural(s.warnings, 'warning')}, ${plural(s.infos, 'info')}` : '';
  let subject: string;
  const lines = [`Hello ${input.name},`];
  if (input.state === 'succeeded') {
    subject = `Keepwell: ${input.block} checked, ${counts}`;
    lines.push(`The check of ${input.block} has finished: ${counts} in ${plural(s?.cells ?? 0, 'cell')}.`, REVIEW_CAUTION);
  } else if (input.state === 'failed') {
    subject = `Keepwell: the check of ${input.block} failed`;
    const detail = (input.error ?? '').split('\n').slice(0, 12).join('\n');
    lines.push(`The check of ${input.block} could not be completed.`, detail);
  } else {
    subject = `Keepwell: the check of ${input.block} was cancelled`;
    lines.push(`The check of ${input.block} was cancelled${input.cancelledBy ? ` by ${input.cancelledBy}` : ''}.`);
  }
  const kept = lines.filter(Boolean);
  return {
    subject,
    text: `${kept.join('\n\n')}\n\n${input.link}\n`,
    html: [
      '<div style="font-family: sans-serif; font-size: 15px; line-height: 1.5; color: #1d232b">',
      ...kept.map((p) => `<p>${escape(p).replace(/\n/g, '<br>')}</p>`),
      `<p><a href="${escape(input.link)}">Open the run</a></p>`,
      '</div>',
    ].join('\n'),
  };
}
