import type { FieldValues, Path, UseFormReturn } from 'react-hook-form';
import { limits } from '@coilpath/contract/common';
import { TextField } from '@/components/ui/field';

/** A new password and its repeat, with the rule the server applies said once. */
export function NewPasswordFields<T extends FieldValues & { password: string; confirm: string }>({
  form,
  label = 'Password',
}: {
  form: UseFormReturn<T>;
  label?: string;
}) {
  const errors = form.formState.errors as Partial<Record<'password' | 'confirm', { message?: string }>>;
  return (
    <>
      <TextField
        label={label}
        type="password"
        autoComplete="new-password"
        hint={`At least ${limits.password.min} characters; not a common password, nor one with your name in it.`}
        {...form.register('password' as Path<T>)}
        error={errors.password?.message}
      />
      <TextField
        label={`${label} again`}
        type="password"
        autoComplete="new-password"
        {...form.register('confirm' as Path<T>)}
        error={errors.confirm?.message}
      />
    </>
  );
}
