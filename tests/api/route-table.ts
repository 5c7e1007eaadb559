/**
 * THE table of every API route: who may call it and what each caller gets, for records of the
 * caller's own branch and of another branch. `authorization-matrix.test.ts` checks every row (and
 * fails when the app has a route this table lacks, or the other way round); `bad-input.test.ts`
 * throws malformed bodies, queries and ids at every row that takes input.
 *
 * Adding a route: add a row here with
 *   - `expect`: use `open(...)`, `signedIn(...)` or `roles([...], status, { scoped })` — or spell it
 *     out per caller (`{ own, other }` where the branch matters: another branch's record answers 404);
 *   - `request(f, side, caller)`: a minimal valid request (path with real ids, body, query) aimed
 *     at `side` (the caller's own branch, or Bravo for "other"); `f` has the db and the people;
 *   - `body` / `query`: the route's zod schemas from `@coilpath/contract`, for the bad-input test
 *     (and `textFields` naming body fields that are free text and come back verbatim).
 */
import type { z } from 'zod';
import {
  acceptInvitationSchema,
  branchInputSchema,
  branchPatchSchema,
  customerInputSchema,
  customerPatchSchema,
  customersQuerySchema,
  forgotPasswordSchema,
  ownerSetupSchema,
  invitationInputSchema,
  linkCheckSchema,
  resetPasswordSchema,
  signInSchema,
  siteInputSchema,
  sitePatchSchema,
  sitesQuerySchema,
  unitImportColumns,
  unitImportExample,
  unitImportSchema,
  unitInputSchema,
  unitsQuerySchema,
  unitUpdateSchema,
  circuitTargetsInputSchema,
  refrigerantRecordQuerySchema,
  userProfileSchema,
  usersQuerySchema,
  dayQuerySchema,
  visitStateChangeSchema,
  saveReadingsSchema,
  findingInputSchema,
  closeVisitSchema,
  refrigerantEventInputSchema,
  attachmentUploadFieldsSchema,
  bookingCreateSchema,
  bookingUpdateSchema,
  bookingListQuerySchema,
  rosterBranchQuerySchema,
  loadQuerySchema,
  suggestSchema,
  evenOutSchema,
  evenOutApplySchema,
  workOrderCreateSchema,
  workOrderUpdateSchema,
  workOrderListQuerySchema,
  agreementInputSchema,
  agreementPatchSchema,
  agreementListQuerySchema,
  pmCompletionQuerySchema,
  fixQualityQuerySchema,
  fixQualityCsvQuerySchema,
  createInspectionsSchema,
  warrantyClaimUpdateSchema,
  unitSearchQuerySchema,
  alarmInputSchema,
  alarmImportSchema,
  alarmListQuerySchema,
  repeatAlarmQuerySchema,
  returnVisitQuerySchema,
  queueReturnVisitSchema,
  leakCaseQuerySchema,
  leakCasePatchSchema,
  verificationTestInputSchema,
  bookRepairSchema,
  alarmSourceCreateSchema,
  alarmSourceListQuerySchema,
  alarmSourcePatchSchema,
  mapDeliverySchema,
  type Role,
} from '@coilpath/contract';
import { eq } from 'drizzle-orm';
import { randomBytes } from 'node:crypto';
import type { MailMessage } from '../../apps/api/src/mail/mailer';
import { sendPasswordReset } from '../../apps/api/src/modules/auth/password-reset.service';
import { signLinkToken } from '../../apps/api/src/auth/link-tokens';
import { createInvitation } from '../../apps/api/src/modules/team/team.service';
import { findOpenReturn } from '../../apps/api/src/modules/work-orders/open-return';
import { z as zod } from 'zod';
import {
  alarmDeliveries,
  alarmSources,
  agreements,
  agreementUnits,
  attachments,
  bookings,
  circuits,
  customers,
  findings,
  leakCases,
  mailOutbox,
  sites,
  units,
  users,
  visits,
  visitSignatures,
} from '../../apps/api/src/db/schema';
import { makeSiteWithUnit, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../apps/api/src/testing/fixtures';
import { newSourceSecret, sealSecret, signatureHeader } from '../../apps/api/src/modules/alarm-sources/signature';
import { nextWeekday, type Caller, type MatrixFixture, type Side } from './matrix-fixture';

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
/** One status, or the statuses for the caller's own branch and another branch. */
export type Outcome = number | { own: number; other: number };

export interface RequestSpec {
  /** The concrete path, e.g. `/api/sites/<uuid>`. */
  path: string;
  body?: unknown;
  query?: Record<string, string>;
  /** Sent as multipart/form-data (with `body`'s fields as form fields). */
  files?: { field: string; name: string; content: Buffer; contentType: string }[];
  /** Extra request headers (e.g. a machine route's signature). */
  headers?: Record<string, string>;
}

export interface RouteRow {
  method: Method;
  /** Express path pattern as mounted, e.g. `/api/outbox/:id/attachments/:index`. */
  path: string;
  expect: Record<Caller, Outcome>;
  /** A minimal valid request; the default is the pattern itself with no body. */
  request?: (f: MatrixFixture, side: Side, caller: Caller) => RequestSpec | Promise<RequestSpec>;
  /** The body's zod schema (bad-input test). */
  body?: z.ZodType;
  /** The query's zod schema (bad-input test). */
  query?: z.ZodType;
  /** Body fields holding free text: SQL and HTML in them must be stored and returned verbatim. */
  textFields?: string[];
  /**
   * The answer is a stream that stays open (Server-Sent Events): the request is ended once the status and the
   * first bytes have arrived.
   */
  stream?: boolean;
  /** Skip the bad-input test for this row, saying why. */
  noBadInput?: string;
}

const allRoles: readonly Role[] = ['owner', 'branch_manager', 'dispatcher', 'technician'];

/** Everyone, signed in or not, gets `status`. */
export function open(status: number): Record<Caller, Outcome> {
  return { anonymous: status, owner: status, branch_manager: status, dispatcher: status, technician: status };
}

/** Any signed-in person gets `status`; no session gets 401. */
export function signedIn(status: number): Record<Caller, Outcome> {
  return { ...open(status), anonymous: 401 };
}

/**
 * Only `allowed` roles get `status` (others 403, no session 401). `scoped`: the route is about one
 * branch's records, so a non-owner aiming at another branch gets 404; the owner sees every branch.
 */
export function roles(allowed: readonly Role[], status: number, opts: { scoped?: boolean } = {}): Record<Caller, Outcome> {
  const out: Record<Caller, Outcome> = { anonymous: 401, owner: 403, branch_manager: 403, dispatcher: 403, technician: 403 };
  for (const r of allowed) out[r] = opts.scoped && r !== 'owner' ? { own: status, other: 404 } : status;
  return out;
}

export { allRoles };

const office: readonly Role[] = ['owner', 'branch_manager', 'dispatcher'];
const unique = () => randomBytes(4).toString('hex');

/** The token of the last link e-mailed (invitation, password reset) through the test app's mailer. */
function lastMailedToken(f: MatrixFixture): string {
  const sent = (f.ctx.mailer as unknown as { sent: MailMessage[] }).sent;
  const m = /[?&]token=([^\s&]+)/.exec(sent.at(-1)?.text ?? '');
  if (!m) throw new Error('no link token in the last e-mail');
  return decodeURIComponent(m[1]!);
}

async function invitationToken(f: MatrixFixture, side: Side) {
  const owner = { id: f.owner.id, name: f.owner.name, email: f.owner.email, role: f.owner.role, branchId: null };
  const inv = await createInvitation(
    f.ctx,
    owner,
    `invitee.${unique()}@test.example`,
    userProfileSchema.parse({ name: 'Invitee', role: 'technician', branchId: side.branch.id }),
  );
  return { id: inv.id, token: lastMailedToken(f) };
}

async function resetToken(f: MatrixFixture, side: Side) {
  const u = await makeUser(f.db, 'technician', side.branch.id);
  await sendPasswordReset(f.ctx, u.email);
  return lastMailedToken(f);
}

/**
 * Work on a visit: only its assigned technician (another's visit: 404); office roles may read it
 * but not record work (403 in their scope, 404 outside it).
 */
function visitWork(status: number): Record<Caller, Outcome> {
  return {
    anonymous: 401,
    owner: 403,
    branch_manager: { own: 403, other: 404 },
    dispatcher: { own: 403, other: 404 },
    technician: { own: status, other: 404 },
  };
}

const isoDay = (d: Date) => d.toISOString().slice(0, 10);
/** A 1×1 PNG. */
const tinyPng = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');

/** A technician of the side's branch with an empty calendar (bookings of one call never collide with another's). */
function freeTechnician(f: MatrixFixture, side: Side) {
  return makeUser(f.db, 'technician', side.branch.id);
}

async function circuitsOf(f: MatrixFixture, unitId: string) {
  return f.db.select().from(circuits).where(eq(circuits.unitId, unitId));
}

const managers: readonly Role[] = ['owner', 'branch_manager'];
const daysFrom = (d: Date, n: number) => isoDay(new Date(d.getTime() + n * 86_400_000));

/** An open leak case on the side's unit, repair due in five days. */
async function openLeakCase(f: MatrixFixture, side: Side) {
  const today = f.ctx.clock.now();
  const [c] = await f.db
    .insert(leakCases)
    .values({
      branchId: side.branch.id,
      unitId: side.unit.id,
      openedOn: daysFrom(today, -25),
      rule: 'comfort_cooling',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 24,
      repairDueDate: daysFrom(today, 5),
    })
    .returning();
  return c!;
}

/** A quarterly agreement over the side's unit. */
async function quarterlyAgreement(f: MatrixFixture, side: Side) {
  const today = f.ctx.clock.now();
  const [a] = await f.db
    .insert(agreements)
    .values({
      branchId: side.branch.id,
      siteId: side.site.id,
      name: `PM ${unique()}`,
      rrule: 'FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=15',
      termStart: daysFrom(today, 1),
      termEnd: daysFrom(today, 365),
      slaHours: 24,
      priceCents: 120_000,
      visitMinutes: 90,
    })
    .returning();
  await f.db.insert(agreementUnits).values({ agreementId: a!.id, unitId: side.unit.id });
  return a!;
}

/** A return visit whose visit found a factory defect (a warranty-claim case). */
async function factoryDefectReturn(f: MatrixFixture, side: Side) {
  const wo = await makeWorkOrder(f.db, {
    branchId: side.branch.id,
    siteId: side.site.id,
    unitId: side.unit.id,
    kind: 'return_visit',
    originWorkOrderId: side.booked.workOrder.id,
    state: 'closed',
  });
  const now = f.ctx.clock.now();
  const [v] = await f.db
    .insert(visits)
    .values({ branchId: side.branch.id, workOrderId: wo.id, techId: side.technician.id, onSiteAt: now, closedAt: now, outcome: 'resolved' })
    .returning();
  await f.db.insert(findings).values({ visitId: v!.id, unitId: side.unit.id, causeCode: 'refrigerant_leak', origin: 'factory_defect' });
  return wo;
}

const unitBody = (over: Record<string, unknown> = {}) => ({
  tag: `RTU-${unique()}`,
  kind: 'rooftop_unit',
  make: 'Testmake',
  model: 'TM-10',
  serial: `SN-${unique()}`,
  refrigerant: 'R-410A',
  fullChargeLb: 12,
  applianceCategory: 'comfort_cooling',
  notes: 'Roof hatch on the north side',
  circuits: [{ number: 1, compressorCount: 1 }],
  ...over,
});

/** A customer with no sites, a site with no units, a unit with no history: deletable. */
async function bareCustomer(f: MatrixFixture, side: Side) {
  const [c] = await f.db
    .insert(customers)
    .values({ branchId: side.branch.id, name: `Bare ${unique()}` })
    .returning();
  return c!;
}
async function bareSite(f: MatrixFixture, side: Side) {
  const [s] = await f.db
    .insert(sites)
    .values({
      branchId: side.branch.id,
      customerId: side.customer.id,
      name: `Bare ${unique()}`,
      address: '1 Empty Lot',
      lat: 41.9,
      lon: -87.7,
    })
    .returning();
  return s!;
}
async function bareUnit(f: MatrixFixture, side: Side) {
  const [u] = await f.db
    .insert(units)
    .values({
      branchId: side.branch.id,
      siteId: side.site.id,
      tag: `RTU-${unique()}`,
      kind: 'rooftop_unit',
      make: 'M',
      model: 'X',
      serial: unique(),
      refrigerant: 'R-410A',
      fullChargeLb: 5,
      applianceCategory: 'comfort_cooling',
    })
    .returning();
  return u!;
}

/** An alarm source at the side's site, with its secret. */
async function alarmSourceOf(f: MatrixFixture, side: Side) {
  const secret = newSourceSecret();
  const [s] = await f.db
    .insert(alarmSources)
    .values({ branchId: side.branch.id, siteId: side.site.id, name: `BMS ${unique()}`, secretBox: sealSecret(f.ctx.secret, secret) })
    .returning();
  return { source: s!, secret };
}

/** A signed delivery whose unit tag matched no unit of the site. */
async function unmatchedDelivery(f: MatrixFixture, side: Side) {
  const { source } = await alarmSourceOf(f, side);
  const [d] = await f.db
    .insert(alarmDeliveries)
    .values({
      sourceId: source.id,
      branchId: side.branch.id,
      deliveryId: unique(),
      status: 'unmatched',
      reason: 'unknown_unit',
      unitTag: 'AHU-X',
      code: 'FAN',
      raisedAt: f.ctx.clock.now(),
      receivedAt: f.ctx.clock.now(),
    })
    .returning();
  return d!;
}

export const routeTable: RouteRow[] = [
  // ── health, config, auth ────────────────────────────────────────────────────────────────
  { method: 'GET', path: '/api/health', expect: open(200) },
  { method: 'GET', path: '/api/config', expect: open(200) },
  // The first-owner setup: this database has people already, so a well-signed link answers 410 to anyone.
  {
    method: 'POST',
    path: '/api/setup/check',
    expect: open(410),
    body: linkCheckSchema,
    request: (f) => ({
      path: '/api/setup/check',
      body: { token: signLinkToken(f.ctx.secret, 'owner-setup', randomBytes(32).toString('base64url')) },
    }),
  },
  {
    method: 'POST',
    path: '/api/setup',
    expect: open(410),
    body: ownerSetupSchema,
    textFields: ['name'],
    request: (f) => ({
      path: '/api/setup',
      body: {
        token: signLinkToken(f.ctx.secret, 'owner-setup', randomBytes(32).toString('base64url')),
        name: 'Robin Field',
        email: 'robin.field@test.example',
        password: 'a-new-password-42',
        confirm: 'a-new-password-42',
      },
    }),
  },
  {
    method: 'POST',
    path: '/api/auth/sign-in',
    expect: open(200),
    body: signInSchema,
    request: (f) => ({ path: '/api/auth/sign-in', body: { email: f.inA.technician.email, password: TEST_PASSWORD } }),
  },
  { method: 'POST', path: '/api/auth/sign-out', expect: open(204) },
  { method: 'POST', path: '/api/auth/sign-out-everywhere', expect: signedIn(200) },
  { method: 'GET', path: '/api/auth/me', expect: signedIn(200) },

  {
    method: 'POST',
    path: '/api/auth/forgot-password',
    expect: open(202),
    body: forgotPasswordSchema,
    request: (f) => ({ path: '/api/auth/forgot-password', body: { email: f.inA.technician.email } }),
  },
  {
    method: 'POST',
    path: '/api/auth/reset-password/check',
    expect: open(200),
    body: linkCheckSchema,
    request: async (f, side) => ({ path: '/api/auth/reset-password/check', body: { token: await resetToken(f, side) } }),
  },
  {
    method: 'POST',
    path: '/api/auth/reset-password',
    expect: open(200),
    body: resetPasswordSchema,
    request: async (f, side) => ({
      path: '/api/auth/reset-password',
      body: { token: await resetToken(f, side), password: 'a-new-password-42', confirm: 'a-new-password-42' },
    }),
  },

  // ── branches ────────────────────────────────────────────────────────────────────────────
  { method: 'GET', path: '/api/branches', expect: signedIn(200) },
  {
    method: 'GET',
    path: '/api/branches/:id',
    expect: roles(allRoles, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/branches/${side.branch.id}` }),
  },
  {
    method: 'POST',
    path: '/api/branches',
    expect: roles(['owner'], 201),
    body: branchInputSchema,
    textFields: ['name', 'baseAddress'],
    request: () => ({
      path: '/api/branches',
      body: {
        name: 'Denver',
        code: `D${unique().slice(0, 6)}`,
        timeZone: 'America/Denver',
        baseAddress: '1 Depot Road',
        baseLat: 39.74,
        baseLon: -104.99,
        labourRate: 95,
        sensorTolerancePercent: 3,
        sensorToleranceAbsolute: 5,
        repeatAlarmCount: 2,
        repeatAlarmDays: 30,
        callbackWindowDays: 30,
      },
    }),
  },
  {
    method: 'PATCH',
    path: '/api/branches/:id',
    expect: roles(['owner'], 200),
    body: branchPatchSchema,
    textFields: ['name', 'baseAddress'],
    request: (_f, side) => ({ path: `/api/branches/${side.branch.id}`, body: { baseAddress: '2 Depot Road' } }),
  },

  // ── customers, sites, units (offices; branch-scoped) ────────────────────────────────────
  {
    method: 'GET',
    path: '/api/customers',
    expect: roles(office, 200, { scoped: true }),
    query: customersQuerySchema,
    request: (_f, side) => ({ path: '/api/customers', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/customers',
    expect: roles(office, 201, { scoped: true }),
    body: customerInputSchema,
    textFields: ['name', 'notes', 'billingAddress'],
    request: (_f, side) => ({
      path: '/api/customers',
      body: { branchId: side.branch.id, name: 'Lakeside Foods', notes: 'Gate code at the office' },
    }),
  },
  {
    method: 'GET',
    path: '/api/customers/:id',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/customers/${side.customer.id}` }),
  },
  {
    method: 'PATCH',
    path: '/api/customers/:id',
    expect: roles(office, 200, { scoped: true }),
    body: customerPatchSchema,
    textFields: ['name', 'notes', 'billingAddress'],
    request: (_f, side) => ({ path: `/api/customers/${side.customer.id}`, body: { notes: 'Call ahead' } }),
  },
  {
    method: 'POST',
    path: '/api/customers/:id/archive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/customers/${side.customer.id}/archive` }),
  },
  {
    method: 'POST',
    path: '/api/customers/:id/unarchive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/customers/${side.customer.id}/unarchive` }),
  },
  {
    method: 'DELETE',
    path: '/api/customers/:id',
    expect: roles(office, 204, { scoped: true }),
    request: async (f, side) => ({ path: `/api/customers/${(await bareCustomer(f, side)).id}` }),
  },
  {
    method: 'GET',
    path: '/api/sites',
    expect: roles(office, 200, { scoped: true }),
    query: sitesQuerySchema,
    request: (_f, side) => ({ path: '/api/sites', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/sites',
    expect: roles(office, 201, { scoped: true }),
    body: siteInputSchema,
    textFields: ['name', 'address', 'accessNotes'],
    request: (_f, side) => ({
      path: '/api/sites',
      body: {
        customerId: side.customer.id,
        name: 'North plant',
        address: '5 Mill Road',
        lat: 41.9,
        lon: -87.7,
        accessNotes: 'Ladder in the boiler room',
      },
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:id',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/sites/${side.site.id}` }),
  },
  {
    method: 'PATCH',
    path: '/api/sites/:id',
    expect: roles(office, 200, { scoped: true }),
    body: sitePatchSchema,
    textFields: ['name', 'address', 'accessNotes'],
    request: (_f, side) => ({ path: `/api/sites/${side.site.id}`, body: { accessNotes: 'Key at reception' } }),
  },
  {
    method: 'POST',
    path: '/api/sites/:id/archive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/sites/${side.site.id}/archive` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:id/unarchive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/sites/${side.site.id}/unarchive` }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:id',
    expect: roles(office, 204, { scoped: true }),
    request: async (f, side) => ({ path: `/api/sites/${(await bareSite(f, side)).id}` }),
  },
  {
    method: 'GET',
    path: '/api/units',
    expect: roles(office, 200, { scoped: true }),
    query: unitsQuerySchema,
    request: (_f, side) => ({ path: '/api/units', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/units',
    expect: roles(office, 201, { scoped: true }),
    body: unitInputSchema,
    textFields: ['notes', 'make', 'model'],
    request: (_f, side) => ({ path: '/api/units', body: unitBody({ siteId: side.site.id }) }),
  },
  {
    method: 'POST',
    path: '/api/units/import',
    expect: roles(office, 200, { scoped: true }),
    body: unitImportSchema,
    textFields: ['csv'],
    request: (_f, side) => ({
      path: '/api/units/import',
      body: {
        siteId: side.site.id,
        mode: 'dry-run',
        csv: `${unitImportColumns.join(',')}\n${unitImportColumns.map((c) => unitImportExample[c]).join(',')}\n`,
      },
    }),
  },
  {
    method: 'GET',
    path: '/api/units/:id',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}` }),
  },
  {
    method: 'PUT',
    path: '/api/units/:id',
    expect: roles(office, 200, { scoped: true }),
    body: unitUpdateSchema,
    textFields: ['notes', 'make', 'model'],
    request: (_f, side) => ({
      path: `/api/units/${side.unit.id}`,
      body: unitBody({
        tag: side.unit.tag,
        circuits: [
          { number: 1, compressorCount: 1 },
          { number: 2, compressorCount: 1 },
        ],
      }),
    }),
  },
  {
    method: 'PUT',
    path: '/api/units/:id/circuits/:number/targets',
    expect: roles(office, 200, { scoped: true }),
    body: circuitTargetsInputSchema,
    textFields: ['source'],
    request: (_f, side) => ({
      path: `/api/units/${side.unit.id}/circuits/1/targets`,
      body: { temperature: 'F', superheatMin: 8, superheatMax: 12, subcoolingMin: 10, subcoolingMax: 15, source: 'Nameplate' },
    }),
  },
  {
    method: 'POST',
    path: '/api/units/:id/archive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}/archive` }),
  },
  {
    method: 'POST',
    path: '/api/units/:id/unarchive',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}/unarchive` }),
  },
  {
    method: 'DELETE',
    path: '/api/units/:id',
    expect: roles(office, 204, { scoped: true }),
    request: async (f, side) => ({ path: `/api/units/${(await bareUnit(f, side)).id}` }),
  },

  // ── people (owner manages; offices read their branch) ───────────────────────────────────
  {
    method: 'GET',
    path: '/api/users',
    expect: roles(office, 200, { scoped: true }),
    query: usersQuerySchema,
    request: (_f, side) => ({ path: '/api/users', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/users/:id',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/users/${side.technician.id}` }),
  },
  {
    method: 'PATCH',
    path: '/api/users/:id',
    expect: roles(['owner'], 200),
    body: userProfileSchema,
    textFields: ['name', 'startAddress'],
    request: async (f, side) => {
      const u = await makeUser(f.db, 'technician', side.branch.id);
      return { path: `/api/users/${u.id}`, body: { name: 'Renamed Tech', role: 'technician', branchId: side.branch.id } };
    },
  },
  {
    method: 'POST',
    path: '/api/users/:id/deactivate',
    expect: roles(['owner'], 200),
    request: async (f, side) => ({ path: `/api/users/${(await makeUser(f.db, 'technician', side.branch.id)).id}/deactivate` }),
  },
  {
    method: 'POST',
    path: '/api/users/:id/reactivate',
    expect: roles(['owner'], 200),
    request: async (f, side) => ({
      path: `/api/users/${(await makeUser(f.db, 'technician', side.branch.id, { active: false })).id}/reactivate`,
    }),
  },

  // ── invitations (owner; check/accept are public, the e-mailed token is the credential) ──
  { method: 'GET', path: '/api/invitations', expect: roles(['owner'], 200) },
  {
    method: 'POST',
    path: '/api/invitations',
    expect: roles(['owner'], 201),
    body: invitationInputSchema,
    request: (_f, side) => ({
      path: '/api/invitations',
      body: { email: `new.${unique()}@test.example`, profile: { name: 'New Tech', role: 'technician', branchId: side.branch.id } },
    }),
  },
  {
    method: 'POST',
    path: '/api/invitations/:id/resend',
    expect: roles(['owner'], 200),
    request: async (f, side) => ({ path: `/api/invitations/${(await invitationToken(f, side)).id}/resend` }),
  },
  {
    method: 'DELETE',
    path: '/api/invitations/:id',
    expect: roles(['owner'], 200),
    request: async (f, side) => ({ path: `/api/invitations/${(await invitationToken(f, side)).id}` }),
  },
  {
    method: 'POST',
    path: '/api/invitations/check',
    expect: open(200),
    body: linkCheckSchema,
    request: async (f, side) => ({ path: '/api/invitations/check', body: { token: (await invitationToken(f, side)).token } }),
  },
  {
    method: 'POST',
    path: '/api/invitations/accept',
    expect: open(201),
    body: acceptInvitationSchema,
    textFields: ['name'],
    request: async (f, side) => ({
      path: '/api/invitations/accept',
      body: {
        token: (await invitationToken(f, side)).token,
        name: 'Robin Field',
        password: 'a-new-password-42',
        confirm: 'a-new-password-42',
      },
    }),
  },

  // ── outbox (owner) ──────────────────────────────────────────────────────────────────────
  {
    method: 'GET',
    path: '/api/outbox',
    expect: roles(['owner'], 200),
    query: zod.object({ limit: zod.coerce.number().int().min(1).max(500).default(100) }),
    request: () => ({ path: '/api/outbox', query: { limit: '10' } }),
  },
  {
    method: 'GET',
    path: '/api/outbox/:id/attachments/:index',
    expect: roles(['owner'], 200),
    request: async (f) => {
      const storageKey = await f.ctx.storage.put(Buffer.from('report'), { contentType: 'text/plain' });
      const [m] = await f.db
        .insert(mailOutbox)
        .values({
          from: 'a@test.example',
          to: 'b@test.example',
          subject: 'Report',
          attachments: [{ filename: 'report.txt', contentType: 'text/plain', size: 6, storageKey }],
        })
        .returning();
      return { path: `/api/outbox/${m!.id}/attachments/0` };
    },
  },

  // ── Route, calendar feed (technicians) ─────────────────────────────────────────────────
  {
    method: 'GET',
    path: '/api/day',
    expect: roles(['technician'], 200),
    query: dayQuerySchema,
    request: (f) => ({ path: '/api/day', query: { date: isoDay(nextWeekday(f.ctx.clock.now())) } }),
  },
  { method: 'POST', path: '/api/calendar/token', expect: roles(['technician'], 201) },
  { method: 'DELETE', path: '/api/calendar/token', expect: roles(['technician'], 204) },
  {
    method: 'GET',
    path: '/api/calendar/:token.ics',
    // The secret in the URL is the credential (calendar apps send no cookie).
    expect: open(200),
    request: async (f, side) => {
      const token = `cal${unique()}${unique()}${unique()}`;
      await f.db.update(users).set({ calendarToken: token }).where(eq(users.id, side.technician.id));
      return { path: `/api/calendar/${token}.ics` };
    },
    noBadInput: 'the token is opaque; a wrong one answers 404 (covered by the day module tests)',
  },

  // ── visits (the assigned technician records; offices read) ──────────────────────────────
  { method: 'GET', path: '/api/visits/current', expect: roles(['technician'], 200) },
  {
    method: 'GET',
    path: '/api/visits/:id',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: (_f, side) => ({ path: `/api/visits/${side.booked.visit.id}` }),
  },
  {
    method: 'PATCH',
    path: '/api/visits/:id',
    expect: visitWork(200),
    body: visitStateChangeSchema,
    request: async (f, side) => {
      await f.db.update(visits).set({ enRouteAt: null, onSiteAt: null }).where(eq(visits.id, side.booked.visit.id));
      return { path: `/api/visits/${side.booked.visit.id}`, body: { state: 'en_route' } };
    },
  },
  {
    method: 'POST',
    path: '/api/visits/:id/readings',
    expect: visitWork(200),
    body: saveReadingsSchema,
    request: async (f, side) => {
      const [c] = await circuitsOf(f, side.unit.id);
      return {
        path: `/api/visits/${side.booked.visit.id}/readings`,
        body: {
          units: { pressure: 'psig', temperature: 'F' },
          readings: [{ circuitId: c!.id, suctionPressure: 118, liquidPressure: 340, suctionLineTemp: 52, liquidLineTemp: 95 }],
        },
      };
    },
  },
  {
    method: 'POST',
    path: '/api/visits/:id/findings',
    expect: visitWork(201),
    body: findingInputSchema,
    textFields: ['notes', 'alarmCode'],
    request: (_f, side) => ({
      path: `/api/visits/${side.booked.visit.id}/findings`,
      body: { unitId: side.unit.id, causeCode: 'refrigerant_leak', origin: 'wear', notes: 'Oil at the flare nut' },
    }),
  },
  {
    method: 'POST',
    path: '/api/visits/:id/attachments',
    expect: visitWork(201),
    body: attachmentUploadFieldsSchema,
    request: (_f, side) => ({
      path: `/api/visits/${side.booked.visit.id}/attachments`,
      body: { kind: 'photo' },
      files: [{ field: 'file', name: 'nameplate.png', content: tinyPng, contentType: 'image/png' }],
    }),
  },
  {
    method: 'POST',
    path: '/api/visits/:id/close',
    expect: visitWork(200),
    body: closeVisitSchema,
    textFields: ['notes', 'returnNotes'],
    request: (_f, side) => ({
      path: `/api/visits/${side.booked.visit.id}/close`,
      body: {
        outcome: 'needs_return',
        returnNeeds: ['parts'],
        returnNotes: 'Bring a TXV',
        notes: 'Leak at the TXV',
        signature: { kind: 'signed', signerName: 'Dana Whitfield', imagePng: tinyPng.toString('base64') },
      },
    }),
  },
  {
    method: 'GET',
    path: '/api/visits/:id/signature',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: async (f, side) => {
      const now = f.ctx.clock.now();
      await f.db.update(visits).set({ closedAt: now, outcome: 'resolved' }).where(eq(visits.id, side.booked.visit.id));
      await f.db
        .insert(visitSignatures)
        .values({ visitId: side.booked.visit.id, signerName: 'Dana Whitfield', signedAt: now, imagePng: tinyPng, recordedAt: now })
        .onConflictDoNothing();
      return { path: `/api/visits/${side.booked.visit.id}/signature` };
    },
  },
  {
    method: 'POST',
    path: '/api/visits/:id/summary',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: async (f, side) => {
      const now = f.ctx.clock.now();
      await f.db.update(visits).set({ closedAt: now, outcome: 'resolved' }).where(eq(visits.id, side.booked.visit.id));
      return { path: `/api/visits/${side.booked.visit.id}/summary` };
    },
  },
  {
    method: 'GET',
    path: '/api/attachments/:id',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: async (f, side) => {
      const storageKey = await f.ctx.storage.put(tinyPng, { contentType: 'image/png' });
      const [a] = await f.db
        .insert(attachments)
        .values({
          visitId: side.booked.visit.id,
          unitId: side.unit.id,
          kind: 'photo',
          storageKey,
          displayName: 'nameplate.png',
          contentType: 'image/png',
          sizeBytes: tinyPng.length,
        })
        .returning();
      return { path: `/api/attachments/${a!.id}` };
    },
  },
  {
    method: 'GET',
    path: '/api/units/:id/briefing',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}/briefing` }),
  },
  {
    method: 'POST',
    path: '/api/units/:id/refrigerant-events',
    expect: visitWork(201),
    body: refrigerantEventInputSchema,
    request: (_f, side) => ({
      path: `/api/units/${side.unit.id}/refrigerant-events`,
      body: { visitId: side.booked.visit.id, refrigerant: 'R-410A', poundsAdded: 2, reason: 'leak_top_off', cylinderLot: 'LOT-7' },
    }),
  },

  // ── work orders (offices) ───────────────────────────────────────────────────────────────
  {
    method: 'GET',
    path: '/api/work-orders',
    expect: roles(office, 200, { scoped: true }),
    query: workOrderListQuerySchema,
    request: (_f, side) => ({ path: '/api/work-orders', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/work-orders/:id',
    expect: roles(office, 200, { scoped: true }),
    request: (_f, side) => ({ path: `/api/work-orders/${side.workOrder.id}` }),
  },
  {
    method: 'POST',
    path: '/api/work-orders',
    expect: roles(office, 201, { scoped: true }),
    body: workOrderCreateSchema,
    textFields: ['complaint'],
    request: (_f, side) => ({
      path: '/api/work-orders',
      body: { siteId: side.site.id, unitId: side.unit.id, kind: 'service_call', complaint: 'Walk-in cooler warm' },
    }),
  },
  {
    method: 'PATCH',
    path: '/api/work-orders/:id',
    expect: roles(office, 200, { scoped: true }),
    body: workOrderUpdateSchema,
    request: (_f, side) => ({ path: `/api/work-orders/${side.workOrder.id}`, body: { state: 'cancelled' } }),
  },

  // ── Roster: bookings, technicians, load, suggestions, evening out (offices) ─────────────
  {
    method: 'GET',
    path: '/api/bookings',
    expect: roles(office, 200, { scoped: true }),
    query: bookingListQuerySchema,
    request: (f, side) => {
      const from = nextWeekday(f.ctx.clock.now(), 0);
      return {
        path: '/api/bookings',
        query: { branchId: side.branch.id, from: from.toISOString(), to: new Date(from.getTime() + 7 * 86_400_000).toISOString() },
      };
    },
  },
  {
    method: 'POST',
    path: '/api/bookings',
    expect: roles(office, 201, { scoped: true }),
    body: bookingCreateSchema,
    request: async (f, side) => ({
      path: '/api/bookings',
      body: {
        workOrderId: side.workOrder.id,
        techId: (await freeTechnician(f, side)).id,
        startAt: nextWeekday(f.ctx.clock.now(), 18).toISOString(),
      },
    }),
  },
  {
    method: 'PATCH',
    path: '/api/bookings/:id',
    expect: roles(office, 200, { scoped: true }),
    body: bookingUpdateSchema,
    request: async (f, side) => {
      const tech = await freeTechnician(f, side);
      await f.db.update(visits).set({ enRouteAt: null, onSiteAt: null, techId: tech.id }).where(eq(visits.id, side.booked.visit.id));
      await f.db.update(bookings).set({ techId: tech.id }).where(eq(bookings.id, side.booked.booking.id));
      return {
        path: `/api/bookings/${side.booked.booking.id}`,
        body: { version: side.booked.booking.version, startAt: nextWeekday(f.ctx.clock.now(), 17).toISOString() },
      };
    },
  },
  {
    method: 'DELETE',
    path: '/api/bookings/:id',
    expect: roles(office, 204, { scoped: true }),
    request: async (f, side) => {
      await f.db.update(visits).set({ enRouteAt: null, onSiteAt: null }).where(eq(visits.id, side.booked.visit.id));
      return { path: `/api/bookings/${side.booked.booking.id}` };
    },
  },
  {
    method: 'GET',
    path: '/api/roster/technicians',
    expect: roles(office, 200, { scoped: true }),
    query: rosterBranchQuerySchema,
    request: (_f, side) => ({ path: '/api/roster/technicians', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/roster/sites',
    expect: roles(office, 200, { scoped: true }),
    query: rosterBranchQuerySchema,
    request: (_f, side) => ({ path: '/api/roster/sites', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/roster/load',
    expect: roles(office, 200, { scoped: true }),
    query: loadQuerySchema,
    request: (f, side) => {
      const from = nextWeekday(f.ctx.clock.now());
      return {
        path: '/api/roster/load',
        query: { branchId: side.branch.id, from: isoDay(from), to: isoDay(new Date(from.getTime() + 6 * 86_400_000)) },
      };
    },
  },
  {
    method: 'POST',
    path: '/api/roster/suggest',
    expect: roles(office, 200, { scoped: true }),
    body: suggestSchema,
    request: (f, side) => ({
      path: '/api/roster/suggest',
      body: { workOrderId: side.workOrder.id, day: isoDay(nextWeekday(f.ctx.clock.now())) },
    }),
  },
  {
    method: 'POST',
    path: '/api/roster/even-out',
    expect: roles(office, 200, { scoped: true }),
    body: evenOutSchema,
    request: (f, side) => ({
      path: '/api/roster/even-out',
      body: { branchId: side.branch.id, week: isoDay(nextWeekday(f.ctx.clock.now())) },
    }),
  },
  {
    method: 'POST',
    path: '/api/roster/even-out/apply',
    expect: roles(office, 200, { scoped: true }),
    body: evenOutApplySchema,
    request: async (f, side) => {
      const startAt = nextWeekday(f.ctx.clock.now(), 19);
      const tech = await freeTechnician(f, side);
      return {
        path: '/api/roster/even-out/apply',
        body: {
          proposals: [
            {
              workOrderId: side.workOrder.id,
              techId: tech.id,
              startAt: startAt.toISOString(),
              endAt: new Date(startAt.getTime() + 3600_000).toISOString(),
            },
          ],
        },
      };
    },
  },

  // ── Fix Quality (owners, branch managers) and warranty claims ───────────────────────────
  ...(['/api/reports/fix-quality', '/api/reports/fix-quality/factory-defects', '/api/reports/fix-quality.pdf'] as const).map(
    (path): RouteRow => ({
      method: 'GET',
      path,
      expect: roles(managers, 200, { scoped: true }),
      query: fixQualityQuerySchema,
      request: (f, side) => ({
        path,
        query: { branchId: side.branch.id, from: daysFrom(f.ctx.clock.now(), -90), to: isoDay(f.ctx.clock.now()) },
      }),
    }),
  ),
  {
    method: 'GET',
    path: '/api/reports/fix-quality.csv',
    expect: roles(managers, 200, { scoped: true }),
    query: fixQualityCsvQuerySchema,
    request: (f, side) => ({
      path: '/api/reports/fix-quality.csv',
      query: { branchId: side.branch.id, from: daysFrom(f.ctx.clock.now(), -90), to: isoDay(f.ctx.clock.now()), table: 'byTechnician' },
    }),
  },
  { method: 'GET', path: '/api/reports/fix-quality/model-alerts', expect: roles(managers, 200) },
  {
    method: 'POST',
    path: '/api/reports/fix-quality/model-alerts/inspections',
    expect: roles(['owner'], 201),
    body: createInspectionsSchema,
    request: async (f, side) => {
      // A model alert: the same factory defect at two sites; then a third, unchecked unit to inspect.
      const make = `Make${unique()}`;
      const model = 'M-1';
      const sideAt = async () => {
        const more = await makeSiteWithUnit(f.db, side.branch.id, { unit: { make, model } });
        return { ...side, site: more.site, unit: more.unit };
      };
      await factoryDefectReturn(f, await sideAt());
      await factoryDefectReturn(f, await sideAt());
      const unchecked = await sideAt();
      return {
        path: '/api/reports/fix-quality/model-alerts/inspections',
        body: { make, model, causeCode: 'refrigerant_leak', unitIds: [unchecked.unit.id] },
      };
    },
  },
  {
    method: 'PATCH',
    path: '/api/warranty-claims/:workOrderId',
    expect: roles(managers, 200, { scoped: true }),
    body: warrantyClaimUpdateSchema,
    textFields: ['reference', 'notes'],
    request: async (f, side) => ({
      path: `/api/warranty-claims/${(await factoryDefectReturn(f, side)).id}`,
      body: { status: 'claimed', amountCents: 42_000, reference: 'WC-7731', notes: 'Coil replaced under warranty' },
    }),
  },

  // ── Unit file (every role; technicians: units on their assignments) ─────────────────────
  {
    method: 'GET',
    path: '/api/unit-file',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    query: unitSearchQuerySchema,
    request: (_f, side) => ({ path: '/api/unit-file', query: { branchId: side.branch.id, q: 'RTU' } }),
  },
  {
    method: 'GET',
    path: '/api/units/:id/file',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}/file` }),
  },
  {
    method: 'GET',
    path: '/api/units/:id/refrigerant-record',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    query: refrigerantRecordQuerySchema,
    request: (_f, side) => ({ path: `/api/units/${side.unit.id}/refrigerant-record` }),
  },
  {
    method: 'GET',
    path: '/api/units/:id/file/attachments/:attachmentId',
    expect: { ...roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }), technician: { own: 200, other: 404 } },
    request: async (f, side) => {
      const storageKey = await f.ctx.storage.put(tinyPng, { contentType: 'image/png' });
      const [a] = await f.db
        .insert(attachments)
        .values({
          visitId: side.booked.visit.id,
          unitId: side.unit.id,
          kind: 'nameplate',
          storageKey,
          displayName: 'nameplate.png',
          contentType: 'image/png',
          sizeBytes: tinyPng.length,
        })
        .returning();
      return { path: `/api/units/${side.unit.id}/file/attachments/${a!.id}` };
    },
  },

  // ── Watchlist: alarms, repeat alarms, return visits, leak cases (managers) ──────────────
  {
    method: 'GET',
    path: '/api/alarms',
    expect: roles(managers, 200, { scoped: true }),
    query: alarmListQuerySchema,
    request: (_f, side) => ({ path: '/api/alarms', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/alarms',
    expect: roles(['owner', 'branch_manager', 'dispatcher'], 201, { scoped: true }),
    body: alarmInputSchema,
    textFields: ['description'],
    request: (f, side) => ({
      path: '/api/alarms',
      body: {
        unitId: side.unit.id,
        circuit: 1,
        code: 'HP-1',
        description: 'High head pressure lockout',
        raisedAt: f.ctx.clock.now().toISOString(),
      },
    }),
  },
  {
    method: 'POST',
    path: '/api/alarms/import',
    expect: roles(managers, 200, { scoped: true }),
    body: alarmImportSchema,
    textFields: ['csv'],
    request: (f, side) => ({
      path: '/api/alarms/import',
      body: {
        branchId: side.branch.id,
        mode: 'dry_run',
        csv: `unit_serial,circuit,code,raised_at\n${side.unit.serial},1,HP-1,${f.ctx.clock.now().toISOString()}\n`,
      },
    }),
  },
  {
    method: 'GET',
    path: '/api/watchlist/repeat-alarms',
    expect: roles(managers, 200, { scoped: true }),
    query: repeatAlarmQuerySchema,
    request: (_f, side) => ({ path: '/api/watchlist/repeat-alarms', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/watchlist/units',
    expect: roles(managers, 200, { scoped: true }),
    query: returnVisitQuerySchema,
    request: (_f, side) => ({ path: '/api/watchlist/units', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/watchlist/return-visits',
    expect: roles(managers, 200, { scoped: true }),
    query: returnVisitQuerySchema,
    request: (_f, side) => ({ path: '/api/watchlist/return-visits', query: { branchId: side.branch.id } }),
  },
  {
    method: 'PATCH',
    path: '/api/watchlist/return-visits/:id',
    expect: roles(managers, 200, { scoped: true }),
    body: queueReturnVisitSchema,
    request: async (f, side) => {
      // The origin visit closed as needing a return, as the technician's close does; its return visit is the
      // unit's one open return (made once per side: a unit has at most one).
      await f.db
        .update(visits)
        .set({ closedAt: f.ctx.clock.now(), outcome: 'needs_return', returnNeeds: ['parts'] })
        .where(eq(visits.id, side.booked.visit.id));
      const wo =
        (await findOpenReturn(f.db, side.unit.id)) ??
        (await makeWorkOrder(f.db, {
          branchId: side.branch.id,
          siteId: side.site.id,
          unitId: side.unit.id,
          kind: 'return_visit',
          originWorkOrderId: side.booked.workOrder.id,
        }));
      return { path: `/api/watchlist/return-visits/${wo.id}`, body: { priority: 'high', latestDate: daysFrom(f.ctx.clock.now(), 7) } };
    },
  },
  {
    method: 'GET',
    path: '/api/leak-cases',
    expect: roles(managers, 200, { scoped: true }),
    query: leakCaseQuerySchema,
    request: (_f, side) => ({ path: '/api/leak-cases', query: { branchId: side.branch.id } }),
  },
  {
    method: 'PATCH',
    path: '/api/leak-cases/:id',
    expect: roles(managers, 200, { scoped: true }),
    body: leakCasePatchSchema,
    request: async (f, side) => ({
      path: `/api/leak-cases/${(await openLeakCase(f, side)).id}`,
      // Yesterday (UTC) is never in the future in any branch's time zone.
      body: { action: 'repaired', repairedOn: daysFrom(f.ctx.clock.now(), -1), notes: 'Brazed the return bend' },
    }),
  },
  {
    method: 'POST',
    path: '/api/leak-cases/:id/verification-tests',
    expect: roles(managers, 201, { scoped: true }),
    body: verificationTestInputSchema,
    textFields: ['notes'],
    request: async (f, side) => {
      const c = await openLeakCase(f, side);
      await f.db
        .update(leakCases)
        .set({ status: 'repaired', repairedOn: daysFrom(f.ctx.clock.now(), -2) })
        .where(eq(leakCases.id, c.id));
      return {
        path: `/api/leak-cases/${c.id}/verification-tests`,
        body: { kind: 'initial', testedOn: daysFrom(f.ctx.clock.now(), -1), passed: true, notes: 'Held pressure' },
      };
    },
  },
  {
    method: 'POST',
    path: '/api/leak-cases/:id/repair-visit',
    expect: roles(managers, 201, { scoped: true }),
    body: bookRepairSchema,
    textFields: ['notes'],
    request: async (f, side) => ({
      path: `/api/leak-cases/${(await openLeakCase(f, side)).id}/repair-visit`,
      body: { priority: 'high', notes: 'Bring nitrogen' },
    }),
  },

  // ── Alarm sources (managers) and the signed ingest route (machine-to-machine) ─────────
  {
    method: 'GET',
    path: '/api/alarm-sources',
    expect: roles(managers, 200, { scoped: true }),
    query: alarmSourceListQuerySchema,
    request: (_f, side) => ({ path: '/api/alarm-sources', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/alarm-sources',
    expect: roles(managers, 201, { scoped: true }),
    body: alarmSourceCreateSchema,
    textFields: ['name'],
    request: (_f, side) => ({ path: '/api/alarm-sources', body: { siteId: side.site.id, name: 'Roof BMS' } }),
  },
  {
    method: 'PATCH',
    path: '/api/alarm-sources/:id',
    expect: roles(managers, 200, { scoped: true }),
    body: alarmSourcePatchSchema,
    textFields: ['name'],
    request: async (f, side) => ({
      path: `/api/alarm-sources/${(await alarmSourceOf(f, side)).source.id}`,
      body: { name: 'Penthouse BMS', enabled: false },
    }),
  },
  {
    method: 'POST',
    path: '/api/alarm-sources/:id/rotate',
    expect: roles(managers, 200, { scoped: true }),
    request: async (f, side) => ({ path: `/api/alarm-sources/${(await alarmSourceOf(f, side)).source.id}/rotate` }),
  },
  {
    method: 'POST',
    path: '/api/alarm-sources/deliveries/:id/map',
    expect: roles(managers, 200, { scoped: true }),
    body: mapDeliverySchema,
    request: async (f, side) => ({
      path: `/api/alarm-sources/deliveries/${(await unmatchedDelivery(f, side)).id}/map`,
      body: { unitId: side.unit.id },
    }),
  },
  {
    method: 'POST',
    path: '/api/ingest/alarms/:sourceId',
    // The signature is the credential: any caller, session or not, with a signed delivery gets 202.
    expect: open(202),
    noBadInput:
      'the signature is checked before the body is read; malformed, unsigned and oversized bodies are covered in modules/alarm-sources/alarm-sources.test.ts',
    request: async (f, side) => {
      const { source, secret } = await alarmSourceOf(f, side);
      const body = { deliveryId: unique(), unitTag: side.unit.tag, code: 'LP1', raisedAt: f.ctx.clock.now().toISOString() };
      const ts = String(Math.floor(f.ctx.clock.now().getTime() / 1000));
      return {
        path: `/api/ingest/alarms/${source.id}`,
        body,
        headers: { 'X-Coilpath-Timestamp': ts, 'X-Coilpath-Signature': signatureHeader(secret, ts, Buffer.from(JSON.stringify(body))) },
      };
    },
  },

  // ── Agreements (owners, branch managers) ────────────────────────────────────────────────
  {
    method: 'GET',
    path: '/api/agreements',
    expect: roles(managers, 200, { scoped: true }),
    query: agreementListQuerySchema,
    request: (_f, side) => ({ path: '/api/agreements', query: { branchId: side.branch.id } }),
  },
  {
    method: 'GET',
    path: '/api/agreements/pm-completion',
    expect: roles(managers, 200, { scoped: true }),
    query: pmCompletionQuerySchema,
    request: (_f, side) => ({ path: '/api/agreements/pm-completion', query: { branchId: side.branch.id } }),
  },
  {
    method: 'POST',
    path: '/api/agreements',
    expect: roles(managers, 201, { scoped: true }),
    body: agreementInputSchema,
    textFields: ['name', 'seasonNotes'],
    request: (f, side) => ({
      path: '/api/agreements',
      body: {
        siteId: side.site.id,
        name: 'Quarterly rooftop PM',
        unitIds: [side.unit.id],
        recurrence: { preset: 'quarterly', startMonth: 1, dayOfMonth: 15 },
        seasonNotes: 'Coil cleaning in spring',
        termStart: daysFrom(f.ctx.clock.now(), 1),
        termEnd: daysFrom(f.ctx.clock.now(), 365),
        slaHours: 24,
        priceCents: 120_000,
        visitMinutes: 90,
        tasks: ['Replace filters'],
      },
    }),
  },
  {
    method: 'GET',
    path: '/api/agreements/:id',
    expect: roles(managers, 200, { scoped: true }),
    request: async (f, side) => ({ path: `/api/agreements/${(await quarterlyAgreement(f, side)).id}` }),
  },
  {
    method: 'PATCH',
    path: '/api/agreements/:id',
    expect: roles(managers, 200, { scoped: true }),
    body: agreementPatchSchema,
    textFields: ['name', 'seasonNotes'],
    request: async (f, side) => ({
      path: `/api/agreements/${(await quarterlyAgreement(f, side)).id}`,
      body: { seasonNotes: 'Belts in autumn' },
    }),
  },
  {
    method: 'POST',
    path: '/api/agreements/:id/plan',
    expect: roles(managers, 200, { scoped: true }),
    request: async (f, side) => ({ path: `/api/agreements/${(await quarterlyAgreement(f, side)).id}/plan` }),
  },
  {
    method: 'POST',
    path: '/api/agreements/:id/plan/apply',
    expect: roles(managers, 200, { scoped: true }),
    request: async (f, side) => ({ path: `/api/agreements/${(await quarterlyAgreement(f, side)).id}/plan/apply` }),
  },
  {
    // Server-Sent Events: the answer never ends, so the matrix reads its status and first bytes and hangs up.
    method: 'GET',
    path: '/api/events',
    expect: signedIn(200),
    stream: true,
  },

  // ── modules landing next: add their rows here (Sites/Team, Roster, Route/Visit, Watchlist/
  //    Agreements, Fix Quality). Example of a branch-scoped record route:
  // {
  //   method: 'PATCH', path: '/api/sites/:id',
  //   expect: roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }),
  //   body: siteUpdateSchema, textFields: ['name', 'accessNotes'],
  //   request: (_f, side) => ({ path: `/api/sites/${side.site.id}`, body: { name: 'Renamed' } }),
  // },
];
