/** Injected time source, so tests can pin "now". */
export interface Clock {
  now(): Date;
}
export const systemClock: Clock = { now: () => new Date() };
export const fixedClock = (at: Date | string): Clock => ({ now: () => new Date(at) });
