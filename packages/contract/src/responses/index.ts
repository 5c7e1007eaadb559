/**
 * `@coilpath/contract/responses`: the zod schema of every API answer, one file per area, each tied to the
 * contract's interface (`Agree` in `agree.ts`) so the two cannot drift. Kept out of the contract's index so the
 * web's production bundle does not carry them: the API checks its answers with them outside production
 * (`endpoint({ response })`), the web's fetchers in development and tests (`api.get(…, { check })`).
 */
export * from './day';
export * from './visits';
export * from './watchlist';
export * from './roster';
export * from './unit-file';
export * from './sites';
export * from './team';
export * from './alarm-sources';
export * from './agreements';
export * from './fix-quality';
export * from './outbox';
