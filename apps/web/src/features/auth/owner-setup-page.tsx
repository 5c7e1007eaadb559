import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import { ownerSetupSchema } from '@coilpath/contract/auth';
import type { OwnerSetup } from '@coilpath/contract';
import { api, errorMessage } from '@/lib/api-client';
import { useLinkSignIn } from '@/lib/link-sign-in';
import { NewPasswordFields } from '@/components/new-password-fields';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { LoadingState } from '@/components/ui/states';
import { Alert, PublicShell } from '@/components/public-shell';

/** The first owner of a new Coilpath, from the one-time link the server printed at its first start. */
export default function OwnerSetupPage() {
  const [sp] = useSearchParams();
  const token = sp.get('token') ?? '';
  const check = useQuery({
    queryKey: ['owner-setup-check', token],
    queryFn: () => api.post<{ ok: true }>('/api/setup/check', { token }),
    enabled: token.length > 0,
    retry: false,
  });
  const form = useForm<OwnerSetup>({
    resolver: zodResolver(ownerSetupSchema),
    defaultValues: { token, name: '', email: '', password: '', confirm: '' },
  });
  const { onSubmit, error } = useLinkSignIn(form, '/api/setup');

  let body;
  if (!token) body = <Alert tone="alarm">This page needs the setup link the server printed when it first started. Open that link.</Alert>;
  else if (check.isPending) body = <LoadingState label="Checking the setup link…" />;
  else if (check.isError) body = <Alert tone="alarm">{errorMessage(check.error)}</Alert>;
  else
    body = (
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <p className="text-sm text-slate">
          This Coilpath has no one yet. You become its <strong className="text-ink">owner</strong>: you add branches and invite everyone
          else. This link works once.
        </p>
        <TextField label="Your name" autoComplete="name" {...form.register('name')} error={form.formState.errors.name?.message} />
        <TextField
          label="E-mail"
          type="email"
          autoComplete="username"
          {...form.register('email')}
          error={form.formState.errors.email?.message}
        />
        <NewPasswordFields form={form} />
        {error && <Alert tone="alarm">{error}</Alert>}
        <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
          Set up Coilpath
        </Button>
      </form>
    );
  return <PublicShell title="Set up Coilpath">{body}</PublicShell>;
}
