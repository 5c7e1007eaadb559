import { describe, expect, it } from 'vitest';
import type { Role, SessionUser } from '@coilpath/contract';
import { HttpError } from '../lib/errors';
import {
  assertBranch,
  branchMayReach,
  branchRequest,
  branchScope,
  enforce,
  mayDeactivate,
  mayRecordRefrigerant,
  ownBranchForNew,
  resolveBranch,
  roleMayAct,
  unitMayRead,
  visitMayRead,
  visitMayRecordWork,
  visitMayResendSummary,
} from './policy';

const A = '11111111-1111-4111-8111-111111111111';
const B = '22222222-2222-4222-8222-222222222222';

const person = (role: Role, branchId: string | null = A, id = `u-${role}`): SessionUser => ({
  id,
  name: role,
  email: `${role}@example.test`,
  role,
  branchId: role === 'owner' ? null : branchId,
});
const owner = person('owner');
const manager = person('branch_manager');
const dispatcher = person('dispatcher');
const tech = person('technician');

const notFound = (what: string) => ({ ok: false, status: 404, code: 'not_found', message: `No such ${what}.` });
const forbidden = (message: string) => ({ ok: false, status: 403, code: 'forbidden', message });

describe('roles', () => {
  it('lets a listed role act and refuses another with 403 naming the roles that may', () => {
    expect(roleMayAct(dispatcher, ['owner', 'dispatcher'])).toEqual({ ok: true });
    expect(roleMayAct(tech, ['owner', 'branch_manager', 'dispatcher'])).toEqual(
      forbidden('Only owners, branch managers, dispatchers may do this.'),
    );
  });
});

describe('branches', () => {
  it('gives the owner every branch and anyone else their own (none without a branch)', () => {
    expect(branchScope(owner)).toBeNull();
    expect(branchScope(manager)).toEqual([A]);
    expect(branchScope(person('dispatcher', null))).toEqual([]);
  });

  it('resolves a list request: the owner names any branch or none; another branch is 404 for anyone else', () => {
    expect(branchRequest(owner, B)).toEqual({ ok: true, branchId: B });
    expect(branchRequest(owner, undefined)).toEqual({ ok: true, branchId: undefined });
    expect(branchRequest(dispatcher, undefined)).toEqual({ ok: true, branchId: A });
    expect(branchRequest(dispatcher, A)).toEqual({ ok: true, branchId: A });
    expect(branchRequest(dispatcher, B)).toEqual(notFound('branch'));
    expect(resolveBranch(manager, undefined)).toBe(A);
    expect(() => resolveBranch(manager, B)).toThrow(new HttpError(404, 'not_found', 'No such branch.'));
  });

  it("hides another branch's record (404 with its name), never 403", () => {
    expect(branchMayReach(owner, B, 'site')).toEqual({ ok: true });
    expect(branchMayReach(manager, A, 'site')).toEqual({ ok: true });
    expect(branchMayReach(manager, B, 'site')).toEqual(notFound('site'));
    expect(branchMayReach(manager, null)).toEqual(notFound('record'));
    expect(branchMayReach(person('dispatcher', null), A, 'agreement')).toEqual(notFound('agreement'));
    expect(() => assertBranch(dispatcher, B, 'leak case')).toThrow(new HttpError(404, 'not_found', 'No such leak case.'));
    expect(() => assertBranch(dispatcher, A, 'leak case')).not.toThrow();
  });

  it('puts a new record in the own branch, or leaves the choice to the owner', () => {
    expect(ownBranchForNew(owner, B)).toEqual({ ok: true, branchId: null });
    expect(ownBranchForNew(dispatcher, undefined)).toEqual({ ok: true, branchId: A });
    expect(ownBranchForNew(dispatcher, A)).toEqual({ ok: true, branchId: A });
    expect(ownBranchForNew(dispatcher, B)).toEqual(notFound('branch'));
    expect(ownBranchForNew(person('dispatcher', null), null)).toEqual(notFound('branch'));
  });
});

describe('visits and units', () => {
  const own = { techId: tech.id, branchId: A };
  const colleagues = { techId: 'u-other', branchId: A };
  const elsewhere = { techId: 'u-other', branchId: B };

  it('lets a technician read only their own visits and the office its branch', () => {
    expect(visitMayRead(tech, own)).toEqual({ ok: true });
    expect(visitMayRead(tech, colleagues)).toEqual(notFound('visit'));
    expect(visitMayRead(tech, undefined)).toEqual(notFound('visit'));
    expect(visitMayRead(owner, elsewhere)).toEqual({ ok: true });
    expect(visitMayRead(dispatcher, colleagues)).toEqual({ ok: true });
    expect(visitMayRead(dispatcher, elsewhere)).toEqual(notFound('visit'));
    expect(visitMayRead(person('branch_manager', null), colleagues)).toEqual(notFound('visit'));
  });

  it('lets only the assigned technician record work; the office in scope gets 403, out of scope 404', () => {
    expect(visitMayRecordWork(tech, own)).toEqual({ ok: true });
    expect(visitMayRecordWork(tech, colleagues)).toEqual(notFound('visit'));
    expect(visitMayRecordWork(dispatcher, colleagues)).toEqual(
      forbidden('Only the technician assigned to this visit records its work. Ask them, or reassign the visit on the Roster.'),
    );
    expect(visitMayRecordWork(dispatcher, elsewhere)).toEqual(notFound('visit'));
  });

  it("refuses a technician resending another technician's summary", () => {
    expect(visitMayResendSummary(tech, own)).toEqual({ ok: true });
    expect(visitMayResendSummary(tech, colleagues)).toEqual(forbidden('Your role may not do this.'));
    expect(visitMayResendSummary(manager, colleagues)).toEqual({ ok: true });
  });

  it("reads a unit's history: technicians on their assignments, the office in its branch", () => {
    expect(unitMayRead(owner, { branchId: B }, false)).toEqual({ ok: true });
    expect(unitMayRead(tech, { branchId: A }, true)).toEqual({ ok: true });
    expect(unitMayRead(tech, { branchId: A }, false)).toEqual(notFound('unit'));
    expect(unitMayRead(dispatcher, { branchId: A }, false)).toEqual({ ok: true });
    expect(unitMayRead(dispatcher, { branchId: B }, true)).toEqual(notFound('unit'));
  });

  it('leaves refrigerant entries to technicians', () => {
    expect(mayRecordRefrigerant(tech)).toEqual({ ok: true });
    expect(mayRecordRefrigerant(manager)).toEqual(forbidden('Only the technician doing the work records refrigerant added or recovered.'));
  });
});

describe('people', () => {
  it('refuses an owner deactivating themselves', () => {
    expect(mayDeactivate(owner, owner.id)).toEqual(forbidden('You cannot deactivate yourself. Ask another owner.'));
    expect(mayDeactivate(owner, 'u-someone')).toEqual({ ok: true });
  });
});

describe('enforce', () => {
  it('throws the refusal as the HttpError the API answers with, and nothing when allowed', () => {
    expect(() => enforce({ ok: true })).not.toThrow();
    const thrown = (() => {
      try {
        enforce(forbidden('No.') as Parameters<typeof enforce>[0]);
      } catch (e) {
        return e;
      }
    })();
    expect(thrown).toBeInstanceOf(HttpError);
    expect(thrown).toMatchObject({ status: 403, code: 'forbidden', message: 'No.' });
  });
});
