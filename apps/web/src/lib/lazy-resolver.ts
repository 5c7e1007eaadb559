import type { FieldValues, Resolver } from 'react-hook-form';

/**
 * A react-hook-form resolver that loads on first use (or on `preload()`), so a form's zod schema — and zod
 * with the whole contract package — stays out of the JavaScript needed to show the first page. The schema is
 * still the one the API validates with.
 */
export function lazyResolver<T extends FieldValues>(load: () => Promise<Resolver<T>>): Resolver<T> & { preload(): Promise<unknown> } {
  let loaded: Promise<Resolver<T>> | undefined;
  const get = () => (loaded ??= load());
  const resolver = (async (values, context, options) => (await get())(values, context, options)) as Resolver<T>;
  return Object.assign(resolver, { preload: () => get().catch(() => undefined) });
}
