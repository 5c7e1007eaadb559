import { describe, expect, it } from 'vitest';
import type { SessionUser } from '@coilpath/contract';
import { keptQueryRoots, shouldKeep } from './query-persist';

const user = (role: SessionUser['role']) =>
  ({ id: 'u1', name: 'Luis Ferreira', email: 'tech@example.test', role, branchId: 'b1' }) as SessionUser;
const query = (queryKey: unknown[], status: 'success' | 'error' | 'pending' = 'success') => ({ queryKey, state: { status } }) as never;

describe('what a phone keeps', () => {
  it('keeps the technician’s route, briefings, visits and unit files once answered', () => {
    for (const key of [
      ['day', '2026-12-07'],
      ['unit-briefing', 'u9'],
      ['visit', 'v1'],
      ['units', 'file', 'u9'],
      ['session'],
      ['branches', 'visible'],
    ]) {
      expect(shouldKeep(query(key), user('technician'))).toBe(true);
    }
    expect([...keptQueryRoots].sort()).toEqual(['branches', 'day', 'session', 'unit-briefing', 'units', 'visit']);
  });

  it('keeps nothing for the office roles or signed-out, no failed or pending answer, and no other screen', () => {
    for (const role of ['dispatcher', 'branch_manager', 'owner'] as const)
      expect(shouldKeep(query(['day', 'today']), user(role))).toBe(false);
    expect(shouldKeep(query(['day', 'today']), null)).toBe(false);
    expect(shouldKeep(query(['day', 'today'], 'error'), user('technician'))).toBe(false);
    expect(shouldKeep(query(['day', 'today'], 'pending'), user('technician'))).toBe(false);
    expect(shouldKeep(query(['roster', 'b1']), user('technician'))).toBe(false);
    expect(shouldKeep(query([42]), user('technician'))).toBe(false);
  });
});
