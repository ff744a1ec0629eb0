// Form validation uses the shared zod schemas (the same ones the server applies); this error
// map only rewords zod's generic messages for people filling in a form.

import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldValues, Resolver } from 'react-hook-form';
import type { z } from 'zod';

type Issue = Parameters<z.core.$ZodErrorMap>[0];

export function friendlyMessage(issue: Issue): string | undefined {
  const empty = issue.input === '' || issue.input === undefined || issue.input === null;
  switch (issue.code) {
    case 'invalid_format':
      if (issue.format === 'email') return empty ? 'Enter an e-mail address.' : 'That does not look like an e-mail address.';
      return undefined;
    case 'too_small':
      if (issue.origin === 'string') return Number(issue.minimum) === 1 ? 'This cannot be empty.' : `Use at least ${issue.minimum} characters.`;
      if (issue.origin === 'array') return Number(issue.minimum) === 1 ? 'Choose at least one.' : `Choose at least ${issue.minimum}.`;
      return undefined;
    case 'too_big':
      if (issue.origin === 'string') return `Use at most ${issue.maximum} characters.`;
      return undefined;
    case 'invalid_type':
      return empty ? 'This cannot be empty.' : undefined;
    default:
      return undefined;
  }
}

/** `zodResolver` with Keepwell's wording for zod's generic messages. */
export function formResolver<S extends z.ZodType<FieldValues, FieldValues>>(schema: S): Resolver<z.input<S>, unknown, z.output<S>> {
  return zodResolver(schema, { error: friendlyMessage as never }) as Resolver<z.input<S>, unknown, z.output<S>>;
}
