import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { forgotPasswordSchema } from '@coilpath/contract/team';
import type { ForgotPassword } from '@coilpath/contract';
import { api, errorMessage } from '@/lib/api-client';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Alert, PublicShell } from '@/components/public-shell';

/** Asks for a reset link; the answer is the same whether or not the address has an account. */
export default function ForgotPasswordPage() {
  const [answer, setAnswer] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const form = useForm<ForgotPassword>({ resolver: zodResolver(forgotPasswordSchema), defaultValues: { email: '' } });
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const res = await api.post<{ message: string }>('/api/auth/forgot-password', values);
      setAnswer(res.message);
    } catch (e) {
      setError(errorMessage(e));
    }
  });
  return (
    <PublicShell title="Forgot your password?">
      {answer ? (
        <Alert tone="ok">{answer}</Alert>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <p className="text-sm text-slate">Enter the e-mail address you sign in with. We will send a link to choose a new password.</p>
          <TextField
            label="E-mail"
            type="email"
            autoComplete="username"
            inputMode="email"
            {...form.register('email')}
            error={form.formState.errors.email?.message}
          />
          {error && <Alert tone="alarm">{error}</Alert>}
          <Button type="submit" size="lg" busy={form.formState.isSubmitting}>
            Send the link
          </Button>
        </form>
      )}
    </PublicShell>
  );
}
