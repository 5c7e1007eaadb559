/**
 * What one journey leaves for a later one on the same server (journeys run in file-name order).
 * Kept in `test-results/e2e/`, which the runner empties at the start of every run, so a hand-off
 * is always from this run's server — never a stale one.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { repoRoot } from '../support/server-process';

const file = join(repoRoot, 'test-results/e2e/handoff.json');

export interface Handoff {
  /** The return visit the technician's close-out created (the number shown as WO-<n>). */
  returnVisit?: { number: number; siteName: string; originNumber: number };
  /** The visit the technician closed with the customer's signature (its work order) and who signed. */
  signedSummary?: { workOrderNumber: number; signerName: string };
}

export function writeHandoff(patch: Handoff): void {
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify({ ...readHandoff(), ...patch }, null, 2));
}

export function readHandoff(): Handoff {
  return existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as Handoff) : {};
}

/** The calendar date in a time zone, `YYYY-MM-DD`. */
export function dateInZone(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}

export function addDays(date: string, n: number): string {
  const d = new Date(`${date}T12:00:00Z`);
  d.setUTCDate(d.getUTCDate() + n);
  return d.toISOString().slice(0, 10);
}

/** 0 = Sunday … 6 = Saturday. */
export const weekdayOf = (date: string): number => new Date(`${date}T12:00:00Z`).getUTCDay();
