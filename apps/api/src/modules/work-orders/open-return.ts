/**
 * One open return visit per unit. A close-out that needs a return, a leak case's repair visit and a return
 * visit made by hand all come back to the same unit: while one return visit is open (not closed, not
 * cancelled) the next need joins it instead of sending a second truck. The database keeps the rule (the
 * partial unique index `OPEN_RETURN_INDEX`, migration 0010); this module finds the open return, adds a need
 * to it, and turns a collision into `409 open_return_exists` with the open work order in `details`.
 */
import {
  priorities,
  workOrderLabel,
  type OpenReturnDetails,
  type Priority,
  type ReturnNeed,
  type WorkOrderState,
} from '@coilpath/contract';
import { zonedInstant } from '@coilpath/calc';
import type { Db, Tx } from '../../db/client';
import { OPEN_RETURN_INDEX } from '../../db/schema';
import { conflict, type HttpError } from '../../lib/errors';
import { latestVisitId, selectOpenReturn, updateWorkOrderRow, type WorkOrderRecord } from './work-orders.repo';

/** States in which a work order is finished; every other state is open. */
export const FINISHED_STATES = ['closed', 'cancelled'] as const satisfies readonly WorkOrderState[];

export const isOpenState = (s: WorkOrderState) => !(FINISHED_STATES as readonly string[]).includes(s);

type WorkOrderRow = WorkOrderRecord;

/** The unit's open return visit, if any (at most one), locked for the rest of the transaction when asked. */
export async function findOpenReturn(tx: Tx, unitId: string, opts: { lock?: boolean } = {}): Promise<WorkOrderRow | null> {
  return (await selectOpenReturn(tx, unitId, [...FINISHED_STATES], opts.lock ?? false)) ?? null;
}

/** The end of a leak case's repair due date in the branch's zone: the latest its repair visit may be booked. */
export const leakRepairLatestAt = (repairDueDate: string, timeZone: string) => new Date(zonedInstant(repairDueDate, '23:59', timeZone));

/** What a need brings to the return visit it joins. */
export interface ReturnNeedToAdd {
  needs: readonly ReturnNeed[];
  /** A deadline (latest booking); the earlier of the two stands. */
  latestAt: Date | null;
  priority: Priority;
  /** A sentence added to the work order's complaint. */
  complaint: string;
  estimatedMinutes: number;
  requiredSkill?: string | null | undefined;
  requiredCertification?: WorkOrderRow['requiredCertification'] | undefined;
  leakCaseId?: string | null | undefined;
}

const earlier = (a: Date | null, b: Date | null) => (a && b ? (a <= b ? a : b) : (a ?? b));
const higher = (a: Priority, b: Priority) => (priorities.indexOf(a) <= priorities.indexOf(b) ? a : b);

/**
 * Adds a need to the open return visit `open` (found with `findOpenReturn(…, { lock: true })` in the same
 * transaction): its return needs gain the new ones, its latest booking takes the earlier deadline, its priority
 * the higher one, its estimate the longer one; skill, certification and leak case fill in where it had none.
 */
export async function joinOpenReturn(tx: Tx, open: WorkOrderRow, add: ReturnNeedToAdd, now: Date): Promise<void> {
  const needs = [...open.returnNeeds];
  for (const n of add.needs) if (!needs.includes(n)) needs.push(n);
  await updateWorkOrderRow(tx, open.id, {
    returnNeeds: needs,
    latestAt: earlier(open.latestAt, add.latestAt),
    priority: higher(open.priority, add.priority),
    complaint: [open.complaint.trim(), add.complaint.trim()].filter(Boolean).join(' '),
    estimatedMinutes: Math.max(open.estimatedMinutes, add.estimatedMinutes),
    requiredSkill: open.requiredSkill ?? add.requiredSkill ?? null,
    requiredCertification: open.requiredCertification ?? add.requiredCertification ?? null,
    leakCaseId: open.leakCaseId ?? add.leakCaseId ?? null,
    updatedAt: now,
  });
}

export async function openReturnDetails(tx: Tx, wo: Pick<WorkOrderRow, 'id' | 'number' | 'state' | 'unitId'>): Promise<OpenReturnDetails> {
  const visitId = await latestVisitId(tx, wo.id);
  return { workOrderId: wo.id, number: wo.number, state: wo.state, unitId: wo.unitId, visitId };
}

/** `409 open_return_exists` naming the open return visit. */
export async function openReturnExists(
  tx: Tx,
  wo: Pick<WorkOrderRow, 'id' | 'number' | 'state' | 'unitId'>,
  message?: string,
): Promise<HttpError> {
  const state = wo.state.replace('_', ' ');
  return conflict(
    'open_return_exists',
    message ??
      `This unit already has an open return visit, ${workOrderLabel(wo.number)} (${state}); add to it rather than sending a second one.`,
    await openReturnDetails(tx, wo),
  );
}

interface PgError {
  code?: string;
  constraint?: string;
  detail?: string;
  cause?: unknown;
}

/** The database error (drizzle wraps it as `cause`) if `e` is the open-return index refusing a second open return. */
function openReturnViolation(e: unknown): PgError | null {
  for (let x = e as PgError | undefined, depth = 0; x && depth < 4; x = x.cause as PgError | undefined, depth++) {
    if (x.code === '23505' && x.constraint === OPEN_RETURN_INDEX) return x;
  }
  return null;
}

export const isOpenReturnViolation = (e: unknown) => openReturnViolation(e) !== null;

/** Thrown inside an attempt when what it read changed meanwhile (another request linked or opened a return): run it again. */
export class OpenReturnChanged extends Error {
  constructor() {
    super('The open return visit changed meanwhile.');
    this.name = 'OpenReturnChanged';
  }
}

const ATTEMPTS = 3;

/**
 * Runs `attempt` — one whole transaction that may open or join a unit's open return visit. When another
 * request committed an open return on the same unit meanwhile (the index refuses the insert, or the attempt
 * throws `OpenReturnChanged`), the transaction has rolled back and runs again: it then sees that return and
 * joins it, or answers 409 as its rules say. If the collisions go on, the answer is 409 `open_return_exists`
 * naming the unit's open return — never a 500.
 */
export async function withOneOpenReturn<T>(db: Db, attempt: () => Promise<T>): Promise<T> {
  let last: unknown;
  for (let i = 0; i < ATTEMPTS; i++) {
    try {
      return await attempt();
    } catch (e) {
      if (!(e instanceof OpenReturnChanged) && !isOpenReturnViolation(e)) throw e;
      last = e;
    }
  }
  const unitId = /\(unit_id\)=\(([0-9a-f-]{36})\)/i.exec(openReturnViolation(last)?.detail ?? '')?.[1];
  const open = unitId ? await findOpenReturn(db, unitId) : null;
  if (open) throw await openReturnExists(db, open);
  throw conflict('open_return_exists', 'Another return visit for this unit was saved at the same moment. Reload and try again.');
}
