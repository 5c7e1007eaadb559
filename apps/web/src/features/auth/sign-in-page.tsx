import { useEffect, useState } from 'react';
import { useForm, type Resolver } from 'react-hook-form';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Link, useLocation, useNavigate } from 'react-router-dom';
import type { PublicConfig, SessionUser, SignIn } from '@coilpath/contract';
import { api, ApiError } from '@/lib/api-client';
import { lazyResolver } from '@/lib/lazy-resolver';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Wordmark } from '@/components/ui/logo';
import { homeFor } from '@/lib/screens';
import type { SignedOutState } from '@/lib/session';

const demoAccounts = [
  ['owner@coilpath.example', 'Owner'],
  ['manager@coilpath.example', 'Branch manager'],
  ['dispatch@coilpath.example', 'Dispatcher'],
  ['tech@coilpath.example', 'Technician'],
] as const;

/** The contract's sign-in schema, loaded after the page shows (zod is not needed to draw it). */
const signInResolver = lazyResolver<SignIn>(async () => {
  const [{ zodResolver }, { signInSchema }] = await Promise.all([import('@hookform/resolvers/zod'), import('@coilpath/contract/auth')]);
  return zodResolver(signInSchema) as Resolver<SignIn>;
});

export function SignInPage() {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const location = useLocation();
  const [serverError, setServerError] = useState<string | null>(null);
  const { data: config } = useQuery({ queryKey: ['public-config'], queryFn: () => api.get<PublicConfig>('/api/config') });
  const form = useForm<SignIn>({ resolver: signInResolver, defaultValues: { email: '', password: '' } });
  useEffect(() => void signInResolver.preload(), []);
  const signedOut = location.state as Partial<SignedOutState> | null;

  const onSubmit = form.handleSubmit(async (values) => {
    setServerError(null);
    try {
      const { user } = await api.post<{ user: SessionUser }>('/api/auth/sign-in', values);
      qc.setQueryData(['session'], user);
      const from = (location.state as { from?: string } | null)?.from;
      navigate(from && from !== '/' ? from : homeFor(user.role), { replace: true });
    } catch (e) {
      setServerError(e instanceof ApiError ? e.message : 'Sign-in failed.');
    }
  });

  return (
    <main className="flex min-h-dvh items-center justify-center bg-ink px-4 py-10">
      <div className="w-full max-w-md rounded-xl bg-white p-6 shadow-xl sm:p-8">
        <div className="mb-1 text-2xl">
          <Wordmark />
        </div>
        <p className="mb-6 text-sm text-slate">Scheduling and service records for your branches, technicians and units.</p>
        <h1 className="mb-4 text-xl font-semibold">Sign in</h1>
        {signedOut?.signedOut && (
          <p role="status" className="mb-4 rounded-md bg-ok-tint px-3 py-2 text-sm text-ok">
            {signedOut.signedOut === 'everywhere' && signedOut.email && signedOut.endedAt
              ? `You are signed out everywhere: every session of ${signedOut.email} ended at ${new Date(signedOut.endedAt).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}, on this and every other device.`
              : 'You are signed out.'}
          </p>
        )}
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <TextField
            label="E-mail"
            type="email"
            autoComplete="username"
            inputMode="email"
            {...form.register('email')}
            error={form.formState.errors.email?.message}
          />
          <TextField
            label="Password"
            type="password"
            autoComplete="current-password"
            {...form.register('password')}
            error={form.formState.errors.password?.message}
          />
          {serverError && (
            <p role="alert" className="rounded-md bg-alarm-tint px-3 py-2 text-sm text-alarm">
              {serverError}
            </p>
          )}
          <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
            Sign in
          </Button>
          <Link to="/forgot-password" className="text-sm text-coolant underline-offset-2 hover:underline">
            Forgot your password?
          </Link>
        </form>
        {config?.demo && (
          <section aria-labelledby="demo-title" className="mt-6 rounded-md border border-slate-line bg-frost p-4 text-sm">
            <h2 id="demo-title" className="mb-2 font-semibold">
              Demo sign-ins
            </h2>
            <p className="mb-2 text-slate">
              Password for every demo account: <code className="rounded bg-white px-1 font-mono text-ink">{config.demoPassword}</code>
            </p>
            <ul className="flex flex-col gap-1">
              {demoAccounts.map(([email, role]) => (
                <li key={email}>
                  <button
                    type="button"
                    className="min-h-9 text-left text-coolant underline-offset-2 hover:underline"
                    onClick={() => {
                      form.setValue('email', email);
                      form.setValue('password', config.demoPassword ?? '');
                    }}
                  >
                    {email}
                  </button>{' '}
                  <span className="text-slate">— {role}</span>
                </li>
              ))}
            </ul>
          </section>
        )}
      </div>
    </main>
  );
}
