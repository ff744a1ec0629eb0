import { useForm } from 'react-hook-form';
import { inviteBodySchema } from '../../../shared/api/auth';
import { ROLE_LABELS, ROLES, type Role } from '../../../shared/roles';
import { Button } from '../../components/Button';
import { Checkbox, CheckboxGroup, TextField } from '../../components/Field';
import { ErrorNotice } from '../../components/Notice';
import { Panel } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { formResolver } from '../../lib/form';
import { useInvite } from './queries';

const ROLE_DESCRIPTIONS: Record<Role, string> = {
  designer: 'Creates blocks, submits runs, asks for waivers.',
  methodology: 'Edits and publishes rule decks; may also submit runs.',
  reviewer: 'Approves or rejects waivers; reads the audit trail.',
  admin: 'Invites people, sets roles, reads the outbox.',
};

export function InviteForm({ onDone, onCancel }: { onDone: (email: string) => void; onCancel: () => void }) {
  const form = useForm({
    resolver: formResolver(inviteBodySchema),
    defaultValues: { email: '', name: '', roles: ['designer'] as Role[] },
  });
  const invite = useInvite();
  const { errors } = form.formState;

  return (
    <Panel className="mb-6 p-5">
      <form
        noValidate
        aria-labelledby="invite-title"
        className="space-y-5"
        onSubmit={form.handleSubmit((values) =>
          invite.mutate(values, {
            onSuccess: () => onDone(values.email),
            onError: (error) => {
              if (isApiError(error, 'conflict')) form.setError('email', { message: 'Someone with this e-mail address is already on the team or invited.' });
            },
          }),
        )}
      >
        <div>
          <h2 id="invite-title" className="text-base font-semibold text-ink-900">
            Invite someone
          </h2>
          <p className="mt-0.5 text-sm text-ink-500">They receive an e-mail with a link to choose a password. You can change their roles at any time.</p>
        </div>
        {invite.isError && !isApiError(invite.error, 'conflict') && <ErrorNotice error={invite.error} title="Could not send the invitation" />}
        <div className="grid gap-5 lg:grid-cols-2">
          <div className="space-y-4">
            <TextField label="Name" autoComplete="off" autoFocus error={errors.name?.message} {...form.register('name')} />
            <TextField label="E-mail address" type="email" autoComplete="off" error={errors.email?.message} {...form.register('email')} />
          </div>
          <CheckboxGroup legend="Roles" error={errors.roles?.message ?? errors.roles?.root?.message}>
            {ROLES.map((role) => (
              <Checkbox key={role} value={role} label={ROLE_LABELS[role]} description={ROLE_DESCRIPTIONS[role]} {...form.register('roles')} />
            ))}
          </CheckboxGroup>
        </div>
        <div className="flex justify-end gap-2">
          <Button onClick={onCancel}>Cancel</Button>
          <Button type="submit" variant="primary" busy={invite.isPending}>
            Send invitation
          </Button>
        </div>
      </form>
    </Panel>
  );
}
