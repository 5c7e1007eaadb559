import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import { acceptInvitationSchema } from '@coilpath/contract/team';
import { roleLabels } from '@coilpath/contract/vocabulary';
import type { AcceptInvitation, InvitationPreview } from '@coilpath/contract';
import { api, errorMessage } from '@/lib/api-client';
import { useLinkSignIn } from '@/lib/link-sign-in';
import { NewPasswordFields } from '@/components/new-password-fields';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { LoadingState } from '@/components/ui/states';
import { Alert, PublicShell } from '@/components/public-shell';

/** Sign-up from an invitation link: the person confirms their name and chooses a password. */
export default function AcceptInvitationPage() {
  const [sp] = useSearchParams();
  const token = sp.get('token') ?? '';
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
  const { onSubmit, error } = useLinkSignIn(form, '/api/invitations/accept');

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
        <NewPasswordFields form={form} />
        {error && <Alert tone="alarm">{error}</Alert>}
        <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
          Create my account
        </Button>
      </form>
    );
  }
  return <PublicShell title="Join Coilpath">{body}</PublicShell>;
}
