import type { Clock } from '../lib/clock';

/** Failed sign-ins allowed within `windowMs`, per key. */
export interface SignInLimits {
  /** One address (IP) trying one account. */
  perAddressAndAccount: number;
  /** One account, from any number of addresses (a guesser spread over many machines). */
  perAccount: number;
  /** One address, across any number of accounts (password spraying). */
  perAddress: number;
  windowMs: number;
}

/** The defaults from a per-address-and-account limit (`config.signInLimit`): 15 minutes' window. */
export function signInLimitsFrom(signInLimit: number, over: Partial<SignInLimits> = {}): SignInLimits {
  return {
    perAddressAndAccount: signInLimit,
    perAccount: Math.max(signInLimit, 50),
    perAddress: Math.max(signInLimit, 50),
    windowMs: 15 * 60_000,
    ...over,
  };
}

export type LimitScope = 'address_and_account' | 'account' | 'address';

export interface SignInRefusal {
  scope: LimitScope;
  /** Seconds until one more attempt is allowed. */
  retryAfterSeconds: number;
}

/**
 * Counts failed sign-ins by address and account, address alone and account alone (a sliding window, by the
 * injected clock), and says when the next attempt may be made. Kept in this process's memory: each API
 * process counts its own attempts (several processes behind a balancer each allow the limits). The limit per
 * account is counted for any e-mail, existing or not, so a refusal does not tell who has an account; it also
 * lets someone hold one account's sign-in back for the window — the price of stopping a distributed guesser.
 */
export function createSignInGuard(clock: Clock, limits: SignInLimits) {
  const failures = new Map<string, number[]>();
  const keys = (address: string, email: string): [string, LimitScope, number][] => [
    [`pair:${address}|${email}`, 'address_and_account', limits.perAddressAndAccount],
    [`account:${email}`, 'account', limits.perAccount],
    [`address:${address}`, 'address', limits.perAddress],
  ];
  const recent = (key: string, now: number): number[] => {
    const times = (failures.get(key) ?? []).filter((t) => t > now - limits.windowMs);
    if (times.length) failures.set(key, times);
    else failures.delete(key);
    return times;
  };
  const sweep = (now: number) => {
    if (failures.size < 50_000) return;
    for (const key of [...failures.keys()]) recent(key, now);
  };
  return {
    /** A refusal when any of the three limits is reached, naming the one that frees last. */
    check(address: string, email: string): SignInRefusal | null {
      const now = clock.now().getTime();
      let worst: SignInRefusal | null = null;
      for (const [key, scope, limit] of keys(address, email)) {
        const times = recent(key, now);
        if (times.length < limit) continue;
        // The attempt that must leave the window before one more fits.
        const freesAt = times[times.length - limit]! + limits.windowMs;
        const retryAfterSeconds = Math.max(1, Math.ceil((freesAt - now) / 1000));
        if (!worst || retryAfterSeconds > worst.retryAfterSeconds) worst = { scope, retryAfterSeconds };
      }
      return worst;
    },
    failed(address: string, email: string): void {
      const now = clock.now().getTime();
      sweep(now);
      for (const [key] of keys(address, email)) failures.set(key, [...recent(key, now), now]);
    },
    /** A right password clears this address's count for the account (the other counts stand). */
    succeeded(address: string, email: string): void {
      failures.delete(`pair:${address}|${email}`);
    },
  };
}

const scopeWords: Record<LimitScope, string> = {
  address_and_account: 'for this account from this address',
  account: 'for this account',
  address: 'from this address',
};

/** "Too many … Try again in 7 minutes." */
export function signInRefusalMessage(r: SignInRefusal): string {
  const minutes = Math.ceil(r.retryAfterSeconds / 60);
  const wait = r.retryAfterSeconds < 60 ? `${r.retryAfterSeconds} seconds` : minutes === 1 ? '1 minute' : `${minutes} minutes`;
  return `Too many failed sign-in attempts ${scopeWords[r.scope]}. Try again in ${wait}.`;
}
