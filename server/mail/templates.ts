// The words of every message Keepwell sends. Plain text first; the HTML part says the same.

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function html(paragraphs: string[], link: { href: string; label: string }): string {
  return [
    '<div style="font-family: sans-serif; font-size: 15px; line-height: 1.5; color: #1d232b">',
    ...paragraphs.map((p) => `<p>${escape(p)}</p>`),
    `<p><a href="${escape(link.href)}">${escape(link.label)}</a></p>`,
    '</div>',
  ].join('\n');
}

export function passwordResetMail(input: { name: string; link: string; validMinutes: number }) {
  const lines = [
    `Hello ${input.name},`,
    'Someone asked to choose a new Keepwell password for this address. If it was you, open the link below; it works once and expires in ' +
      `${input.validMinutes} minutes.`,
    'If you did not ask, ignore this message: your password stays as it is.',
  ];
  return {
    subject: 'Choose a new Keepwell password',
    text: `${lines.join('\n\n')}\n\n${input.link}\n`,
    html: html(lines, { href: input.link, label: 'Choose a new password' }),
  };
}

export function invitationMail(input: { name: string; inviter: string; team: string; link: string; validDays: number }) {
  const lines = [
    `Hello ${input.name},`,
    `${input.inviter} invited you to review circuits with ${input.team} on Keepwell.`,
    `Open the link below to choose your password and sign in. It works once and expires in ${input.validDays} days.`,
  ];
  return {
    subject: `Join ${input.team} on Keepwell`,
    text: `${lines.join('\n\n')}\n\n${input.link}\n`,
    html: html(lines, { href: input.link, label: 'Accept the invitation' }),
  };
}
