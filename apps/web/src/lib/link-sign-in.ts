/**
 * The pages reached from a one-time link (first-owner setup, password reset, invitation): the form is
 * sent to the link's route, the answer signs the person in, and they land on their home screen. The
 * server's password rule (a common or guessable password) answers on the password field itself.
 */
import { useState } from 'react';
import type { FieldValues, Path, UseFormReturn } from 'react-hook-form';
import { useQueryClient } from '@tanstack/react-query';
import { useNavigate } from 'react-router-dom';
import type { SessionUser } from '@coilpath/contract';
import { api, ApiError, errorMessage } from './api-client';
import { homeFor } from './screens';

export function useLinkSignIn<T extends FieldValues & { password: string }>(form: UseFormReturn<T>, path: string) {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [error, setError] = useState<string | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const { user } = await api.post<{ user: SessionUser }>(path, values);
      qc.setQueryData(['session'], user);
      navigate(homeFor(user.role), { replace: true });
    } catch (e) {
      const onPassword = e instanceof ApiError ? e.fieldErrors.password : undefined;
      if (onPassword) form.setError('password' as Path<T>, { message: onPassword });
      else setError(errorMessage(e));
    }
  });
  return { onSubmit, error };
}
