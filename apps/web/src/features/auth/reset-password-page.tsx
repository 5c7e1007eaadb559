import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router-dom';
import { resetPasswordSchema } from '@coilpath/contract/team';
import type { ResetPassword } from '@coilpath/contract';
import { api, errorMessage } from '@/lib/api-client';
import { useLinkSignIn } from '@/lib/link-sign-in';
import { NewPasswordFields } from '@/components/new-password-fields';
import { Button } from '@/components/ui/button';
import { LoadingState } from '@/components/ui/states';
import { Alert, PublicShell } from '@/components/public-shell';

/** Chooses a new password from an e-mailed link; a used or expired link is refused with the reason. */
export default function ResetPasswordPage() {
  const [sp] = useSearchParams();
  const token = sp.get('token') ?? '';
  const check = useQuery({
    queryKey: ['reset-check', token],
    queryFn: () => api.post<{ email: string }>('/api/auth/reset-password/check', { token }),
    enabled: token.length > 0,
    retry: false,
  });
  const form = useForm<ResetPassword>({ resolver: zodResolver(resetPasswordSchema), defaultValues: { token, password: '', confirm: '' } });
  const { onSubmit, error } = useLinkSignIn(form, '/api/auth/reset-password');

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
        <NewPasswordFields form={form} label="New password" />
        {error && <Alert tone="alarm">{error}</Alert>}
        <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
          Save the new password and sign in
        </Button>
      </form>
    );
  return <PublicShell title="Choose a new password">{body}</PublicShell>;
}
