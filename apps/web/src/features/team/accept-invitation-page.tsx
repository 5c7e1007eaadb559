import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useNavigate, useSearchParams } from 'react-router-dom';
import { acceptInvitationSchema, roleLabels, type AcceptInvitation, type InvitationPreview, type SessionUser } from '@coilpath/contract';
import { api, ApiError, errorMessage } from '@/lib/api-client';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { LoadingState } from '@/components/ui/states';
import { homeFor } from '@/lib/screens';
import { Alert, PublicShell } from '@/components/public-shell';

/** Sign-up from an invitation link: the person confirms their name and chooses a password. */
export default function AcceptInvitationPage() {
  const [sp] = useSearchParams();
  const token = sp.get('token') ?? '';
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [error, setError] = useState<string | null>(null);
  const check = useQuery({
    queryKey: ['invitation-check', token],
    queryFn: () => api.post<{ invitation: InvitationPreview }>('/api/invitations/check', { token }).then((r) => r.invitation),
    enabled: token.length > 0,
    retry: false,
  });
  const form = useForm<AcceptInvitation>({
    resolver: zodResolver(acceptInvitationSchema),
    values: { token, name: check.data?.name ?? '', password: '', confirm: '' },
    resetOptions: { keepDirtyValues: true },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const { user } = await api.post<{ user: SessionUser }>('/api/invitations/accept', values);
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
  if (!token) body = <Alert tone="alarm">This page needs the link from your invitation e-mail. Open the link again.</Alert>;
  else if (check.isPending) body = <LoadingState label="Checking the invitation…" />;
  else if (check.isError) body = <Alert tone="alarm">{errorMessage(check.error)}</Alert>;
  else {
    const inv = check.data;
    body = (
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <p className="text-sm text-slate">
          You are invited as <strong className="text-ink">{roleLabels[inv.role].toLowerCase()}</strong>
          {inv.branchName ? (
            <>
              {' '}
              at <strong className="text-ink">{inv.branchName}</strong>
            </>
          ) : null}
          . You will sign in with <strong className="text-ink">{inv.email}</strong>.
        </p>
        <input type="hidden" autoComplete="username" value={inv.email} readOnly />
        <TextField label="Your name" autoComplete="name" {...form.register('name')} error={form.formState.errors.name?.message} />
        <TextField label="Password" type="password" autoComplete="new-password" hint="At least 10 characters; not a common password, nor one with your name in it." {...form.register('password')} error={form.formState.errors.password?.message} />
        <TextField label="Password again" type="password" autoComplete="new-password" {...form.register('confirm')} error={form.formState.errors.confirm?.message} />
        {error && <Alert tone="alarm">{error}</Alert>}
        <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
          Create my account
        </Button>
      </form>
    );
  }
  return <PublicShell title="Join Coilpath">{body}</PublicShell>;
}
