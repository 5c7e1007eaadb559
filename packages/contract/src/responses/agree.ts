import type { z } from 'zod';

/**
 * True when a response schema's output and the contract's interface are the same shape (each assignable to the
 * other, deeply): `export type Checks = [Agree<DayResponse, typeof dayResponseSchema>, …]` fails the typecheck
 * when one of the two changes without the other. (A member the interface marks optional and the schema lacks is
 * not caught: keep optional members in both.)
 */
export type Agree<T, S extends z.ZodType> = [T] extends [z.output<S>] ? ([z.output<S>] extends [T] ? true : false) : false;
/** A list of checks that must all be `true`. */
export type AllAgree<T extends true[]> = T;
