import type { FieldValues, Path, UseFormReturn } from 'react-hook-form';
import { ApiError } from '@/lib/api-client';

/** Puts the API's field messages on the form's fields, and returns the overall message. */
export function applyServerErrors<T extends FieldValues>(form: UseFormReturn<T, unknown, unknown>, e: unknown): string {
  if (e instanceof ApiError) {
    for (const [path, message] of Object.entries(e.fieldErrors)) form.setError(path as Path<T>, { message });
    return e.message;
  }
  return e instanceof Error ? e.message : 'The change was not saved.';
}
