import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { resetPasswordSchema, type ResetPassword, type SessionUser } from '@coilpath/contract';
import { api, ApiError, errorMessage } from '@/lib/api-client';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { LoadingState } from '@/components/ui/states';
import { homeFor } from '@/lib/screens';
import { Alert, PublicShell } from '@/components/public-shell';

/** Chooses a new password from an e-mailed link; a used or expired link is refused with the reason. */
export default function ResetPasswordPage() {
  const [sp] = useSearchParams();
  const token = sp.get('token') ?? '';
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [error, setError] = useState<string | null>(null);
  const check = useQuery({
    queryKey: ['reset-check', token],
    queryFn: () => api.post<{ email: string }>('/api/auth/reset-password/check', { token }),
    enabled: token.length > 0,
    retry: false,
  });
  const form = useForm<ResetPassword>({ resolver: zodResolver(resetPasswordSchema), defaultValues: { token, password: '', confirm: '' } });
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const { user } = await api.post<{ user: SessionUser }>('/api/auth/reset-password', values);
      qc.setQueryData(['session'], user);
      navigate(homeFor(user.role), { replace: true });
    } catch (e) {
      // The server's password rule (a common or guessable password) answers on the field itself.
      const onPassword = e instanceof ApiError ? e.fieldErrors.password : undefined;
      if (onPassword) form.setError('password', { message: onPassword });
      else setError(errorMessage(e));
    }
  });

  let body;
  if (!token) body = <Alert tone="alarm">This page needs the link from the e-mail. Open the link again, or ask for a new one.</Alert>;
  else if (check.isPending) body = <LoadingState label="Checking the link…" />;
  else if (check.isError)
    body = (
      <div className="flex flex-col gap-3">
        <Alert tone="alarm">{errorMessage(check.error)}</Alert>
        <Link to="/forgot-password" className="text-sm text-coolant underline-offset-2 hover:underline">
          Send a new link
        </Link>
      </div>
    );
  else
    body = (
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <p className="text-sm text-slate">
          For <strong className="text-ink">{check.data.email}</strong>. Choosing a new password signs you out on every other device.
        </p>
        <input type="hidden" autoComplete="username" value={check.data.email} readOnly />
        <TextField label="New password" type="password" autoComplete="new-password" hint="At least 10 characters; not a common password, nor one with your name in it." {...form.register('password')} error={form.formState.errors.password?.message} />
        <TextField label="New password again" type="password" autoComplete="new-password" {...form.register('confirm')} error={form.formState.errors.confirm?.message} />
        {error && <Alert tone="alarm">{error}</Alert>}
        <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
          Save the new password and sign in
        </Button>
      </form>
    );
  return <PublicShell title="Choose a new password">{body}</PublicShell>;
}
