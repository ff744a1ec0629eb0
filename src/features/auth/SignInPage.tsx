import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { Navigate, useNavigate, useSearchParams } from 'react-router';
import { meResponseSchema, type User } from '../../../shared/api/auth';
import { Button } from '../../components/Button';
import { TextField } from '../../components/Field';
import { ErrorNotice, Notice } from '../../components/Notice';
import { api, isApiError } from '../../lib/api';
import { formResolver } from '../../lib/form';
import { safeNextPath, startSession, useSession } from '../../lib/session';
import { AuthLayout, AuthLink } from './AuthLayout';
import { signInFormSchema } from './schemas';

function SignInError({ error }: { error: unknown }) {
  if (isApiError(error, 'invalid-credentials'))
    return (
      <Notice tone="error" title="Not signed in">
        That e-mail address and password do not match an active account. Check both, or reset your password.
      </Notice>
    );
  if (isApiError(error, 'rate-limited'))
    return (
      <Notice tone="warning" title="Too many attempts">
        {error.message} Wait a few minutes before trying again.
      </Notice>
    );
  return <ErrorNotice error={error} title="Could not sign in" />;
}

export function SignInPage() {
  const [params] = useSearchParams();
  const next = safeNextPath(params.get('next'));
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const session = useSession();

  const form = useForm({ resolver: formResolver(signInFormSchema), defaultValues: { email: '', password: '' } });
  const signIn = useMutation({
    mutationFn: (body: { email: string; password: string }) =>
      api.post<{ user: User }>('/api/auth/login', body, { schema: meResponseSchema, redirectOnUnauthenticated: false }),
    onSuccess: ({ user }) => {
      startSession(queryClient, user);
      navigate(next, { replace: true });
    },
  });

  if (session.data && !signIn.isPending && !signIn.isSuccess) return <Navigate to={next} replace />;

  const { errors } = form.formState;
  return (
    <AuthLayout
      title="Sign in to Keepwell"
      intro="Use the e-mail address your team’s administrator invited."
      footer={
        <p>
          New to the team? Ask your administrator for an invitation; the e-mail it sends has a link to set your password.
        </p>
      }
    >
      <form noValidate onSubmit={form.handleSubmit((values) => signIn.mutate(values))} className="space-y-5">
        {signIn.isError && <SignInError error={signIn.error} />}
        {params.get('reset') === 'done' && !signIn.isError && (
          <Notice tone="ok" title="Password changed">
            Sign in with your new password.
          </Notice>
        )}
        <TextField label="E-mail address" type="email" autoComplete="username" autoFocus error={errors.email?.message} {...form.register('email')} />
        <TextField label="Password" type="password" autoComplete="current-password" error={errors.password?.message} {...form.register('password')} />
        <div className="flex items-center justify-between gap-4 pt-1">
          <AuthLink to="/reset-password">Forgot your password?</AuthLink>
          <Button type="submit" variant="primary" busy={signIn.isPending}>
            Sign in
          </Button>
        </div>
      </form>
    </AuthLayout>
  );
}
