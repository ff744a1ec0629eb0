import { useMutation } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { useNavigate, useSearchParams } from 'react-router';
import { Button } from '../../components/Button';
import { TextField } from '../../components/Field';
import { ErrorNotice, Notice } from '../../components/Notice';
import { api, isApiError } from '../../lib/api';
import { formResolver } from '../../lib/form';
import { AuthLayout, AuthLink } from './AuthLayout';
import { newPasswordFormSchema, resetRequestFormSchema } from './schemas';

/** `/reset-password` asks for a link by e-mail; `/reset-password?token=…` (the link) sets the new password. */
export function ResetPasswordPage() {
  const [params] = useSearchParams();
  const token = params.get('token');
  return token ? <ConfirmReset token={token} /> : <RequestReset />;
}

function RequestReset() {
  const form = useForm({ resolver: formResolver(resetRequestFormSchema), defaultValues: { email: '' } });
  const request = useMutation({
    mutationFn: (body: { email: string }) => api.post<void>('/api/auth/password-reset', body, { redirectOnUnauthenticated: false }),
  });

  if (request.isSuccess)
    return (
      <AuthLayout title="Check your e-mail" footer={<AuthLink to="/sign-in">Back to sign-in</AuthLink>}>
        <Notice tone="ok" title="Request received">
          If an account uses <strong>{request.variables.email}</strong>, a message with a link to choose a new password is on its way. The link works
          once and expires after a while; ask for another if it does.
        </Notice>
      </AuthLayout>
    );

  return (
    <AuthLayout
      title="Reset your password"
      intro="Enter the e-mail address you sign in with. We will send a link to choose a new password."
      footer={
        <p>
          Remembered it? <AuthLink to="/sign-in">Sign in</AuthLink>
        </p>
      }
    >
      <form noValidate onSubmit={form.handleSubmit((v) => request.mutate(v))} className="space-y-5">
        {request.isError && <ErrorNotice error={request.error} title="Could not send the link" />}
        <TextField label="E-mail address" type="email" autoComplete="email" autoFocus error={form.formState.errors.email?.message} {...form.register('email')} />
        <div className="flex justify-end">
          <Button type="submit" variant="primary" busy={request.isPending}>
            Send reset link
          </Button>
        </div>
      </form>
    </AuthLayout>
  );
}

function ConfirmReset({ token }: { token: string }) {
  const navigate = useNavigate();
  const form = useForm({ resolver: formResolver(newPasswordFormSchema), defaultValues: { password: '', repeat: '' } });
  const confirm = useMutation({
    mutationFn: (password: string) => api.post<void>('/api/auth/password-reset/confirm', { token, password }, { redirectOnUnauthenticated: false }),
    onSuccess: () => navigate('/sign-in?reset=done', { replace: true }),
  });
  const expired = isApiError(confirm.error, 'invalid-token');

  return (
    <AuthLayout title="Choose a new password" intro="At least 10 characters. A passphrase of a few unrelated words is easy to type and hard to guess.">
      <form noValidate onSubmit={form.handleSubmit((v) => confirm.mutate(v.password))} className="space-y-5">
        {confirm.isError &&
          (expired ? (
            <Notice tone="error" title="This link no longer works">
              {confirm.error.message} Links work once and expire; <AuthLink to="/reset-password">ask for a new one</AuthLink>.
            </Notice>
          ) : (
            <ErrorNotice error={confirm.error} title="Could not change the password" />
          ))}
        <TextField label="New password" type="password" autoComplete="new-password" autoFocus error={form.formState.errors.password?.message} {...form.register('password')} />
        <TextField label="Repeat the new password" type="password" autoComplete="new-password" error={form.formState.errors.repeat?.message} {...form.register('repeat')} />
        <div className="flex justify-end">
          <Button type="submit" variant="primary" busy={confirm.isPending}>
            Change password
          </Button>
        </div>
      </form>
    </AuthLayout>
  );
}
