import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { useNavigate, useSearchParams } from 'react-router';
import { meResponseSchema, type User } from '../../../shared/api/auth';
import { Button } from '../../components/Button';
import { TextField } from '../../components/Field';
import { ErrorNotice, Notice } from '../../components/Notice';
import { api, isApiError } from '../../lib/api';
import { formResolver } from '../../lib/form';
import { startSession } from '../../lib/session';
import { AuthLayout, AuthLink } from './AuthLayout';
import { newPasswordFormSchema } from './schemas';

export function AcceptInvitePage() {
  const [params] = useSearchParams();
  const token = params.get('token');
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const form = useForm({ resolver: formResolver(newPasswordFormSchema), defaultValues: { password: '', repeat: '' } });
  const accept = useMutation({
    mutationFn: (password: string) =>
      api.post<{ user: User }>('/api/auth/invitations/accept', { token, password }, { schema: meResponseSchema, redirectOnUnauthenticated: false }),
    onSuccess: ({ user }) => {
      startSession(queryClient, user);
      navigate('/', { replace: true });
    },
  });

  if (!token)
    return (
      <AuthLayout title="Invitation link incomplete" footer={<AuthLink to="/sign-in">Go to sign-in</AuthLink>}>
        <Notice tone="warning" title="No invitation token in this address">
          Open the link from your invitation e-mail exactly as it was sent. If it was split across lines, copy the whole address into the browser.
        </Notice>
      </AuthLayout>
    );

  return (
    <AuthLayout
      title="Join your team on Keepwell"
      intro="Choose a password to finish setting up your account. You will be signed in straight away."
      footer={
        <p>
          Already set up? <AuthLink to="/sign-in">Sign in</AuthLink>
        </p>
      }
    >
      <form noValidate onSubmit={form.handleSubmit((v) => accept.mutate(v.password))} className="space-y-5">
        {accept.isError &&
          (isApiError(accept.error, 'invalid-token') ? (
            <Notice tone="error" title="This invitation no longer works">
              {accept.error.message} Invitations work once and expire; ask your administrator to send a new one.
            </Notice>
          ) : (
            <ErrorNotice error={accept.error} title="Could not accept the invitation" />
          ))}
        <TextField label="Password" type="password" autoComplete="new-password" autoFocus error={form.formState.errors.password?.message} hint="At least 10 characters." {...form.register('password')} />
        <TextField label="Repeat the password" type="password" autoComplete="new-password" error={form.formState.errors.repeat?.message} {...form.register('repeat')} />
        <div className="flex justify-end">
          <Button type="submit" variant="primary" busy={accept.isPending}>
            Set password and sign in
          </Button>
        </div>
      </form>
    </AuthLayout>
  );
}
