/**
 * Who may do what: pure decisions over the signed-in person and the record, no database and no HTTP.
 * Services and the HTTP middleware ask here; nothing here reads a request.
 *
 * - Another branch's record answers **404** (`not_found`, "No such <what>."), never 403, so its existence is
 *   not revealed.
 * - A role that may not act answers **403** (`forbidden`) with the reason.
 *
 * Each rule comes as a decision (`{ ok: true }` or a named refusal) and, where services throw, as an `assert…`
 * that throws the refusal as the existing `HttpError` (`enforce`).
 */
import type { Role, SessionUser } from '@coilpath/contract';
import { HttpError } from '../lib/errors';

export type Refusal =
  { ok: false; status: 404; code: 'not_found'; message: string } | { ok: false; status: 403; code: 'forbidden'; message: string };
export type Decision = { ok: true } | Refusal;

const ALLOWED: Decision = { ok: true };

/** 404 for a record the person may not know exists: the same words as `notFound(what)`. */
export function hidden(what = 'record'): Refusal {
  return { ok: false, status: 404, code: 'not_found', message: `No such ${what}.` };
}

/** 403 for a role that may not act, with the reason (the same default as `forbidden()`). */
export function refused(message = 'Your role may not do this.'): Refusal {
  return { ok: false, status: 403, code: 'forbidden', message };
}

/** The refusal as the HttpError the API answers with. */
export function refusalError(r: Refusal): HttpError {
  return new HttpError(r.status, r.code, r.message);
}

/** Throws the refusal; does nothing when allowed. */
export function enforce(d: Decision): void {
  if (!d.ok) throw refusalError(d);
}

// ---------------------------------------------------------------------------------------------
// Roles
// ---------------------------------------------------------------------------------------------

const roleNames: Record<Role, string> = {
  owner: 'owners',
  branch_manager: 'branch managers',
  dispatcher: 'dispatchers',
  technician: 'technicians',
};

/** A route open to some roles only: 403 naming the roles that may. */
export function roleMayAct(user: SessionUser, allowed: readonly Role[]): Decision {
  if (allowed.includes(user.role)) return ALLOWED;
  return refused(`Only ${allowed.map((r) => roleNames[r]).join(', ')} may do this.`);
}

// ---------------------------------------------------------------------------------------------
// Branches
// ---------------------------------------------------------------------------------------------

/**
 * The branches a user may see: `null` = every branch (owner). A request for another branch's data is
 * answered 404, never 403, so it does not reveal that the record exists.
 */
export function branchScope(user: SessionUser): string[] | null {
  if (user.role === 'owner') return null;
  return user.branchId ? [user.branchId] : [];
}

/** The branch a list request is about, or a 404 for another branch (the owner may name any or none). */
export function branchRequest(user: SessionUser, requested: string | undefined): { ok: true; branchId: string | undefined } | Refusal {
  if (user.role === 'owner') return { ok: true, branchId: requested };
  if (requested && requested !== user.branchId) return hidden('branch');
  return { ok: true, branchId: user.branchId ?? undefined };
}

/** Resolves the branch a list request is about; refuses another branch with 404. */
export function resolveBranch(user: SessionUser, requested: string | undefined): string | undefined {
  const d = branchRequest(user, requested);
  if (!d.ok) throw refusalError(d);
  return d.branchId;
}

/** May the person reach a record of this branch? Owner: any; anyone else: their own branch only (404). */
export function branchMayReach(user: SessionUser, branchId: string | null | undefined, what = 'record'): Decision {
  if (user.role === 'owner') return ALLOWED;
  if (!branchId || branchId !== user.branchId) return hidden(what);
  return ALLOWED;
}

/** Throws 404 when a record's branch is outside the user's scope. */
export function assertBranch(user: SessionUser, branchId: string | null | undefined, what = 'record'): void {
  enforce(branchMayReach(user, branchId, what));
}

/**
 * The branch a new record goes to when the person is not an owner: their own; naming another answers 404, as
 * does a person without a branch. `null` for an owner, who names the branch (checked against the table).
 */
export function ownBranchForNew(user: SessionUser, requested: string | null | undefined): { ok: true; branchId: string | null } | Refusal {
  if (user.role === 'owner') return { ok: true, branchId: null };
  if (!user.branchId) return hidden('branch');
  if (requested && requested !== user.branchId) return hidden('branch');
  return { ok: true, branchId: user.branchId };
}

// ---------------------------------------------------------------------------------------------
// Visits and units
// ---------------------------------------------------------------------------------------------

export interface VisitAccess {
  techId: string | null;
  branchId: string;
}

/**
 * Reading a visit: a technician only their own (404 otherwise); office roles within their branch scope (owner:
 * all; another branch: 404).
 */
export function visitMayRead(user: SessionUser, v: VisitAccess | undefined): Decision {
  if (!v) return hidden('visit');
  if (user.role === 'technician') return v.techId === user.id ? ALLOWED : hidden('visit');
  if (user.role === 'owner') return ALLOWED;
  if (!user.branchId || v.branchId !== user.branchId) return hidden('visit');
  return ALLOWED;
}

/** Recording work on a visit: whoever may read it, and only as its technician (403 for the office). */
export function visitMayRecordWork(user: SessionUser, v: VisitAccess | undefined): Decision {
  const read = visitMayRead(user, v);
  if (!read.ok) return read;
  if (user.role !== 'technician') {
    return refused('Only the technician assigned to this visit records its work. Ask them, or reassign the visit on the Roster.');
  }
  return ALLOWED;
}

/** Sending a closed visit's summary again: whoever may read it; a technician only for their own visit. */
export function visitMayResendSummary(user: SessionUser, v: VisitAccess): Decision {
  if (user.role === 'technician' && v.techId !== user.id) return refused();
  return ALLOWED;
}

/**
 * Reading a unit's history: office roles within their branch scope, technicians only for units on their
 * assignments (`onAssignments`, found by the caller's query); 404 otherwise.
 */
export function unitMayRead(user: SessionUser, unit: { branchId: string | null }, onAssignments: boolean): Decision {
  if (user.role === 'owner') return ALLOWED;
  if (user.role === 'technician') return onAssignments ? ALLOWED : hidden('unit');
  return unit.branchId !== user.branchId ? hidden('unit') : ALLOWED;
}

/** Refrigerant added or recovered is recorded by the technician doing the work. */
export function mayRecordRefrigerant(user: SessionUser): Decision {
  if (user.role !== 'technician') return refused('Only the technician doing the work records refrigerant added or recovered.');
  return ALLOWED;
}

// ---------------------------------------------------------------------------------------------
// People
// ---------------------------------------------------------------------------------------------

/** An owner may not deactivate themselves (another owner must). */
export function mayDeactivate(actor: SessionUser, targetId: string): Decision {
  if (targetId === actor.id) return refused('You cannot deactivate yourself. Ask another owner.');
  return ALLOWED;
}
