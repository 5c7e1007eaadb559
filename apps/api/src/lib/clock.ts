/** Injected time source, so tests can pin "now". */
export interface Clock {
  now(): Date;
}
export const systemClock: Clock = { now: () => new Date() };
export const fixedClock = (at: Date | string): Clock => ({ now: () => new Date(at) });

/**
 * A clock that starts at `start` and runs on with real time, for demos and browser journeys at a chosen
 * instant (`COILPATH_NOW`): the server behaves as if it had been started at `start`, and time passes normally.
 */
export function shiftedClock(start: Date | string, realNow: () => number = Date.now): Clock {
  const startMs = new Date(start).getTime();
  if (Number.isNaN(startMs)) throw new Error(`shiftedClock: not an instant: ${String(start)}`);
  const offset = startMs - realNow();
  return { now: () => new Date(realNow() + offset) };
}
