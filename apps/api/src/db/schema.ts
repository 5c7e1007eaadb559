/**
 * Coilpath's data model (docs/DESIGN.md §4). All instants are `timestamptz` (UTC); calendar dates are `date`
 * strings; column names are snake_case (drizzle `casing`).
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  bigserial,
  boolean,
  check,
  customType,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgTable,
  primaryKey,
  text,
  timestamp,
  unique,
  uniqueIndex,
  uuid,
  type AnyPgColumn,
} from 'drizzle-orm/pg-core';
import type {
  AlarmSource,
  BookingRule,
  ApplianceCategory,
  AttachmentKind,
  CauseCode,
  CauseOrigin,
  Epa608Type,
  LeakCaseStatus,
  NoteAudience,
  Priority,
  RefrigerantEventReason,
  ReturnNeed,
  Role,
  UnitKind,
  VisitOutcome,
  WarrantyClaimStatus,
  WorkingHours,
  WorkOrderKind,
  WorkOrderState,
} from '@coilpath/contract';

const id = () => uuid().primaryKey().defaultRandom();
/** Binary data (`bytea`), read and written as a Buffer. */
const bytea = customType<{ data: Buffer; driverData: Buffer | Uint8Array }>({
  dataType: () => 'bytea',
  fromDriver: (v) => (Buffer.isBuffer(v) ? v : Buffer.from(v)),
});
const instant = () => timestamp({ withTimezone: true, mode: 'date' });
const createdAt = () => instant().notNull().defaultNow();

export const branches = pgTable(
  'branches',
  {
    id: id(),
    name: text().notNull(),
    code: text().notNull(),
    timeZone: text().notNull(),
    baseAddress: text().notNull().default(''),
    baseLat: doublePrecision().notNull(),
    baseLon: doublePrecision().notNull(),
    /** Holiday dates `YYYY-MM-DD` in the branch's own calendar. */
    holidays: jsonb().$type<string[]>().notNull().default([]),
    labourRateCents: integer().notNull().default(0),
    refrigerantPriceCentsPerLb: integer().notNull().default(0),
    currency: text().notNull().default('USD'),
    unitSystem: text().$type<'imperial' | 'si'>().notNull().default('imperial'),
    /** Elevation of the branch's area above sea level, metres: gauge readings are made absolute with the ISA pressure there. */
    elevationMeters: doublePrecision().notNull().default(0),
    sensorTolerancePercent: doublePrecision().notNull().default(3),
    sensorToleranceAbsolute: doublePrecision().notNull().default(5),
    repeatAlarmCount: integer().notNull().default(2),
    repeatAlarmDays: integer().notNull().default(30),
    callbackWindowDays: integer().notNull().default(30),
    /** Inspections created from a model alert are due this many days after they are created. */
    inspectionDueDays: integer().notNull().default(30),
    /** The branch manager's daily digest is sent at this local hour. */
    digestHour: integer().notNull().default(7),
    /** The contractor as the customer's service summary names it (empty: the branch's name). */
    tradingName: text().notNull().default(''),
    /** The office's postal address, phone, contractor's licence number and e-mail (the summary's Reply-To). */
    officeAddress: text().notNull().default(''),
    officePhone: text().notNull().default(''),
    licenceNumber: text().notNull().default(''),
    officeEmail: text().notNull().default(''),
    archivedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('branches_code_uq').on(t.code)],
);

export const users = pgTable(
  'users',
  {
    id: id(),
    email: text().notNull(),
    name: text().notNull(),
    role: text().$type<Role>().notNull(),
    branchId: uuid().references(() => branches.id),
    passwordHash: text(),
    phone: text(),
    skills: jsonb().$type<string[]>().notNull().default([]),
    epa608Type: text().$type<Epa608Type>().notNull().default('none'),
    epa608Number: text(),
    workingHours: jsonb().$type<WorkingHours | null>(),
    startAddress: text(),
    startLat: doublePrecision(),
    startLon: doublePrecision(),
    /** Index into the Roster's technician palette. */
    colorIndex: integer().notNull().default(0),
    active: boolean().notNull().default(true),
    deactivatedAt: instant(),
    /** Raised to sign out every session of the user (deactivation, password reset). */
    sessionVersion: integer().notNull().default(1),
    /** Secret of the private iCalendar feed; null when revoked. */
    calendarToken: text(),
    lastSignInAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('users_email_uq').on(t.email),
    uniqueIndex('users_calendar_token_uq').on(t.calendarToken),
    index('users_branch_role_idx').on(t.branchId, t.role),
  ],
);

export const invitations = pgTable(
  'invitations',
  {
    id: id(),
    email: text().notNull(),
    name: text().notNull(),
    role: text().$type<Role>().notNull(),
    branchId: uuid().references(() => branches.id),
    /** The profile the invited person starts with. */
    profile: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    tokenHash: text().notNull(),
    expiresAt: instant().notNull(),
    usedAt: instant(),
    revokedAt: instant(),
    invitedById: uuid().references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('invitations_token_uq').on(t.tokenHash)],
);

export const passwordResets = pgTable(
  'password_resets',
  {
    id: id(),
    userId: uuid()
      .notNull()
      .references(() => users.id),
    tokenHash: text().notNull(),
    expiresAt: instant().notNull(),
    usedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('password_resets_token_uq').on(t.tokenHash)],
);

/**
 * Sessions signed out before they expire (the `sid` of their token): `authenticate` refuses them. A row is
 * only needed until the token would have expired anyway; sign-out deletes the expired ones.
 */
export const endedSessions = pgTable(
  'ended_sessions',
  {
    sessionId: text().primaryKey(),
    userId: uuid()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** When the token would have expired: after that the row can go. */
    expiresAt: instant().notNull(),
    endedAt: instant().notNull(),
  },
  (t) => [index('ended_sessions_expires_idx').on(t.expiresAt)],
);

export const customers = pgTable(
  'customers',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    name: text().notNull(),
    contactName: text(),
    contactEmail: text(),
    contactPhone: text(),
    billingAddress: text(),
    notes: text(),
    archivedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [index('customers_branch_idx').on(t.branchId, t.name)],
);

export const sites = pgTable(
  'sites',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    customerId: uuid()
      .notNull()
      .references(() => customers.id),
    name: text().notNull(),
    address: text().notNull(),
    city: text().notNull().default(''),
    region: text().notNull().default(''),
    postalCode: text().notNull().default(''),
    lat: doublePrecision().notNull(),
    lon: doublePrecision().notNull(),
    accessNotes: text(),
    contactName: text(),
    contactEmail: text(),
    contactPhone: text(),
    archivedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [index('sites_branch_idx').on(t.branchId, t.name), index('sites_customer_idx').on(t.customerId)],
);

export const units = pgTable(
  'units',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    siteId: uuid()
      .notNull()
      .references(() => sites.id),
    /** The site's own label for the unit, e.g. "RTU-3". */
    tag: text().notNull(),
    kind: text().$type<UnitKind>().notNull(),
    make: text().notNull(),
    model: text().notNull(),
    serial: text().notNull(),
    installDate: date({ mode: 'string' }),
    warrantyEnd: date({ mode: 'string' }),
    refrigerant: text().notNull(),
    fullChargeLb: doublePrecision().notNull(),
    applianceCategory: text().$type<ApplianceCategory>().notNull(),
    tonnage: doublePrecision(),
    nameplateAttachmentId: uuid(),
    notes: text(),
    archivedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('units_make_serial_uq').on(t.make, t.serial),
    index('units_site_idx').on(t.siteId),
    index('units_branch_idx').on(t.branchId),
    index('units_make_model_idx').on(t.make, t.model),
  ],
);

export const circuits = pgTable(
  'circuits',
  {
    id: id(),
    unitId: uuid()
      .notNull()
      .references(() => units.id, { onDelete: 'cascade' }),
    number: integer().notNull(),
    compressorCount: integer().notNull().default(1),
    chargeLb: doublePrecision(),
    /**
     * The manufacturer's target superheat and subcooling ranges (migration 0020), stored as readings store
     * temperature differences: °F, full precision. A range has both ends or neither, min ≤ max.
     */
    targetSuperheatMinF: doublePrecision(),
    targetSuperheatMaxF: doublePrecision(),
    targetSubcoolingMinF: doublePrecision(),
    targetSubcoolingMaxF: doublePrecision(),
    /** Where the target ranges come from ("nameplate", "installation manual p. 14"). */
    targetSource: text(),
  },
  (t) => [
    uniqueIndex('circuits_unit_number_uq').on(t.unitId, t.number),
    check(
      'circuits_target_superheat_ck',
      sql`(${t.targetSuperheatMinF} is null and ${t.targetSuperheatMaxF} is null) or (${t.targetSuperheatMinF} is not null and ${t.targetSuperheatMaxF} is not null and ${t.targetSuperheatMinF} <= ${t.targetSuperheatMaxF})`,
    ),
    check(
      'circuits_target_subcooling_ck',
      sql`(${t.targetSubcoolingMinF} is null and ${t.targetSubcoolingMaxF} is null) or (${t.targetSubcoolingMinF} is not null and ${t.targetSubcoolingMaxF} is not null and ${t.targetSubcoolingMinF} <= ${t.targetSubcoolingMaxF})`,
    ),
  ],
);

export const agreements = pgTable(
  'agreements',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    siteId: uuid()
      .notNull()
      .references(() => sites.id),
    name: text().notNull(),
    /** RFC 5545 recurrence rule, e.g. `FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=15`. */
    rrule: text().notNull(),
    seasonNotes: text(),
    termStart: date({ mode: 'string' }).notNull(),
    termEnd: date({ mode: 'string' }).notNull(),
    slaHours: integer().notNull(),
    priceCents: integer().notNull(),
    visitMinutes: integer().notNull().default(90),
    tasks: jsonb().$type<string[]>().notNull().default([]),
    status: text().$type<'active' | 'ended' | 'cancelled'>().notNull().default('active'),
    createdAt: createdAt(),
    updatedAt: createdAt(),
  },
  (t) => [index('agreements_branch_idx').on(t.branchId, t.termEnd), index('agreements_site_idx').on(t.siteId)],
);

export const agreementUnits = pgTable(
  'agreement_units',
  {
    agreementId: uuid()
      .notNull()
      .references(() => agreements.id, { onDelete: 'cascade' }),
    unitId: uuid()
      .notNull()
      .references(() => units.id),
  },
  (t) => [primaryKey({ columns: [t.agreementId, t.unitId] }), index('agreement_units_unit_idx').on(t.unitId)],
);

/** The partial unique index that keeps one open return visit (not closed, not cancelled) per unit. */
export const OPEN_RETURN_INDEX = 'work_orders_one_open_return_uq';

export const workOrders = pgTable(
  'work_orders',
  {
    id: id(),
    /** Human-facing number, e.g. WO-10234. */
    number: integer().generatedAlwaysAsIdentity({ startWith: 10001 }),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    siteId: uuid()
      .notNull()
      .references(() => sites.id),
    unitId: uuid().references(() => units.id),
    agreementId: uuid().references(() => agreements.id),
    kind: text().$type<WorkOrderKind>().notNull(),
    state: text().$type<WorkOrderState>().notNull().default('unplaced'),
    priority: text().$type<Priority>().notNull().default('normal'),
    complaint: text().notNull().default(''),
    requestedFrom: instant(),
    requestedTo: instant(),
    slaDueAt: instant(),
    /** Latest acceptable booking (return visits, leak-repair deadlines). */
    latestAt: instant(),
    /** Planned maintenance: the date the visit plan placed it on. */
    plannedDate: date({ mode: 'string' }),
    requiredSkill: text(),
    requiredCertification: text().$type<Exclude<Epa608Type, 'none'>>(),
    estimatedMinutes: integer().notNull().default(60),
    originWorkOrderId: uuid().references((): AnyPgColumn => workOrders.id),
    leakCaseId: uuid(),
    returnNeeds: jsonb().$type<ReturnNeed[]>().notNull().default([]),
    /** Why the work exists beyond its kind, e.g. `model-alert:<key>` for inspections. */
    purpose: text(),
    outcome: text().$type<VisitOutcome>(),
    createdById: uuid().references(() => users.id),
    createdAt: createdAt(),
    updatedAt: createdAt(),
    closedAt: instant(),
  },
  (t) => [
    index('work_orders_branch_state_idx').on(t.branchId, t.state),
    index('work_orders_unit_idx').on(t.unitId, t.createdAt),
    index('work_orders_origin_idx').on(t.originWorkOrderId),
    index('work_orders_agreement_idx').on(t.agreementId, t.plannedDate),
    index('work_orders_created_idx').on(t.createdAt),
    // Site-wide work (no unit) at a unit's site: the unit briefing's and unit file's "visits that touched it".
    index('work_orders_site_idx').on(t.siteId, t.createdAt),
    // One open return visit per unit: a close-out's return and a leak case's repair share one truck roll
    // (modules/work-orders/open-return.ts answers a collision 409 `open_return_exists`).
    uniqueIndex(OPEN_RETURN_INDEX)
      .on(t.unitId)
      .where(sql`${t.kind} = 'return_visit' and ${t.state} not in ('closed', 'cancelled')`),
  ],
);

/**
 * One row per service call with what the Fix Quality report needs to know about it: its first visit (the
 * earliest closed visit) and that visit's first finding, its follow-ups (callbacks and return visits booked
 * off it) and the last closed visit of the job and its follow-ups. Derived data, kept by database triggers on
 * work_orders, visits and findings (migration 0002) and rebuilt whole by `rebuild_service_call_facts()`, so
 * the report sums a year of jobs without joining every visit. Never written by the application.
 */
export const serviceCallFacts = pgTable(
  'service_call_facts',
  {
    jobId: uuid()
      .primaryKey()
      .references(() => workOrders.id, { onDelete: 'cascade' }),
    branchId: uuid().notNull(),
    unitId: uuid(),
    openedAt: instant().notNull(),
    firstVisitId: uuid(),
    firstClosedAt: instant(),
    /** The first visit's outcome; a closed visit without one counts as needs_return. */
    firstOutcome: text().$type<VisitOutcome>(),
    techId: uuid(),
    causeCode: text().$type<CauseCode>(),
    origin: text().$type<CauseOrigin>(),
    firstCallbackAt: instant(),
    firstReturnAt: instant(),
    returnVisits: integer().notNull().default(0),
    lastClosedAt: instant(),
    lastOutcome: text().$type<VisitOutcome>(),
  },
  (t) => [
    index('service_call_facts_closed_idx').on(t.firstClosedAt),
    index('service_call_facts_branch_closed_idx').on(t.branchId, t.firstClosedAt),
    // The jobs of one unit, when its make or model changes (fix_quality_sums, migration 0005).
    index('service_call_facts_unit_idx').on(t.unitId),
  ],
);

/** The dimensions of `fix_quality_sums`: every job is counted once in each. */
export type FixQualityDim = 'technician' | 'model' | 'cause' | 'origin';

/** The keys and sums of a row of `fix_quality_sums` (and of the deltas waiting in `fix_quality_sums_pending`). */
const fixQualitySumColumns = () => ({
  branchId: uuid().notNull(),
  /** The first day of the calendar month (UTC) in which the jobs' first visits closed. */
  month: date({ mode: 'string' }).notNull(),
  dim: text().$type<FixQualityDim>().notNull(),
  /** The key of the row's dimension; the other keys are null (a null key of its own dimension = none recorded). */
  techId: uuid(),
  make: text(),
  model: text(),
  causeCode: text().$type<CauseCode>(),
  origin: text().$type<CauseOrigin>(),
  /** Jobs (service calls whose first visit closed in the month), then the sums of `fix_quality_jobs`. */
  jobs: integer().notNull(),
  eligible: integer().notNull(),
  firstTimeFixed: integer().notNull(),
  resolvedFirstVisits: integer().notNull(),
  callbacks: integer().notNull(),
  returnVisits: integer().notNull(),
  resolvedJobs: integer().notNull(),
  /** Microseconds from opening to the resolving visit's close, over the resolved jobs (exact). */
  resolveUs: bigint({ mode: 'number' }).notNull(),
});

/**
 * The Fix Quality report's sums per branch, calendar month (UTC) of the first visit's close, and dimension
 * (technician, make and model, cause, origin), so a year of the report adds up a few thousand rows instead
 * of every job. Derived from `service_call_facts`, the branch's callback window and the unit's make and
 * model through the view `fix_quality_jobs` (one row per job with its counts), and kept by database triggers
 * on those three (migration 0005): each change records its delta in `fix_quality_sums_pending`, and the
 * transaction's deltas are added here at commit, after every other lock it takes, in key order.
 * `rebuild_fix_quality_sums()` recomputes the whole table. Never written by the application.
 */
export const fixQualitySums = pgTable('fix_quality_sums', fixQualitySumColumns(), (t) => [
  unique('fix_quality_sums_key').on(t.month, t.branchId, t.dim, t.techId, t.make, t.model, t.causeCode, t.origin).nullsNotDistinct(),
  // Rows whose jobs all went elsewhere, deleted at once.
  index('fix_quality_sums_empty_idx')
    .on(t.month)
    .where(sql`${t.jobs} = 0`),
]);

/** Deltas of `fix_quality_sums` recorded by the open transaction `txid`, added to it at commit (migration 0005). */
export const fixQualitySumsPending = pgTable(
  'fix_quality_sums_pending',
  {
    txid: bigint({ mode: 'number' }).notNull(),
    ...fixQualitySumColumns(),
  },
  (t) => [index('fix_quality_sums_pending_txid_idx').on(t.txid)],
);

/**
 * A counter per branch, raised (once per transaction, at commit) by database triggers whenever a row the
 * Roster shows changes: bookings, work orders, visits, sites, units, leak cases, technicians, the branch.
 * The Roster's week reads are cached per process and reused while the counter stands (migration 0004);
 * several API processes on one PostgreSQL each see every other's changes. Never written by the application.
 */
export const rosterRevisions = pgTable('roster_revisions', {
  branchId: uuid().primaryKey(),
  revision: bigint({ mode: 'number' }).notNull().default(0),
});

/**
 * A counter per site that deferred triggers raise at the commit of any change a unit briefing of the site shows
 * (migration 0021: the site and its units, circuits, work orders, visits, findings, readings, leak cases,
 * refrigerant entries, alarms and photos; the branch's settings and technicians' names for all its sites).
 * `GET /api/units/:id/briefing` reuses its answer while the revision stands.
 */
export const briefingRevisions = pgTable('briefing_revisions', {
  siteId: uuid().primaryKey(),
  revision: bigint({ mode: 'number' }).notNull().default(0),
});

/**
 * What the open screens hear (`GET /api/events`, `modules/events/`): one row per change a screen shows, written by
 * database triggers in the committing transaction (migration 0016) and announced with `pg_notify('coilpath_live', id)`.
 * `kind`: `roster` (with the branch's new roster revision), `day` (for the technician `user_id`), `visit`, `alarm`,
 * `leak-case`. A reconnecting screen gets the rows after its `Last-Event-ID`; rows older than a day are pruned.
 * Never written by the application.
 */
export const liveEvents = pgTable(
  'live_events',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    branchId: uuid().notNull(),
    kind: text().$type<'roster' | 'day' | 'visit' | 'alarm' | 'leak-case'>().notNull(),
    /** The technician a `day` event is for; null for the others. */
    userId: uuid(),
    payload: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    at: instant().notNull().defaultNow(),
  },
  (t) => [index('live_events_at_idx').on(t.at)],
);

export const bookings = pgTable(
  'bookings',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    workOrderId: uuid()
      .notNull()
      .references(() => workOrders.id),
    techId: uuid()
      .notNull()
      .references(() => users.id),
    startAt: instant().notNull(),
    endAt: instant().notNull(),
    /** Optimistic-concurrency version: a move based on a stale version is refused. */
    version: integer().notNull().default(1),
    fixed: boolean().notNull().default(false),
    /**
     * The booking rules it breaks on purpose (`BookingRule`: skill, certification, working_hours, due_time), in
     * rule order, with the one reason and who gave it (`overrideReason`, `overrideById`). Empty when none.
     */
    overrideRules: jsonb().$type<BookingRule[]>().notNull().default([]),
    /**
     * Outside the technician's working hours on purpose: written as `overrideRules` holding working_hours. Rows
     * booked before `override_rules` existed (migration 0008) have this flag alone; readers take either.
     */
    hoursOverride: boolean().notNull().default(false),
    overrideReason: text(),
    overrideById: uuid().references(() => users.id),
    createdById: uuid().references(() => users.id),
    createdAt: createdAt(),
    updatedAt: createdAt(),
  },
  (t) => [
    index('bookings_branch_start_idx').on(t.branchId, t.startAt),
    index('bookings_tech_start_idx').on(t.techId, t.startAt),
    index('bookings_work_order_idx').on(t.workOrderId),
  ],
);

export const visits = pgTable(
  'visits',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    workOrderId: uuid()
      .notNull()
      .references(() => workOrders.id),
    /**
     * The work order's unit (null for site-wide work), copied by a trigger on insert and kept when the work order's
     * unit changes (migration 0021), so a unit's last visit is one index descent (`visits_unit_closed_idx`).
     */
    unitId: uuid().references(() => units.id),
    bookingId: uuid().references(() => bookings.id, { onDelete: 'set null' }),
    techId: uuid()
      .notNull()
      .references(() => users.id),
    enRouteAt: instant(),
    onSiteAt: instant(),
    closedAt: instant(),
    outcome: text().$type<VisitOutcome>(),
    returnNeeds: jsonb().$type<ReturnNeed[]>().notNull().default([]),
    returnNotes: text(),
    notes: text(),
    /** Who the technician's notes are for: `internal` (the default) never reaches the customer's summary. */
    notesAudience: text().$type<NoteAudience>().notNull().default('internal'),
    /** The finding the technician marked as the call's root cause (a finding of this visit; see closeVisitSchema). */
    rootCauseFindingId: uuid(),
    labourMinutes: integer(),
    summarySentAt: instant(),
    version: integer().notNull().default(1),
    createdAt: createdAt(),
    updatedAt: createdAt(),
  },
  (t) => [
    index('visits_work_order_idx').on(t.workOrderId),
    index('visits_tech_idx').on(t.techId, t.createdAt),
    index('visits_closed_idx').on(t.branchId, t.closedAt),
    index('visits_unit_closed_idx').on(t.unitId, t.closedAt),
    uniqueIndex('visits_booking_uq').on(t.bookingId),
    // The root cause is one of the visit's own findings: the foreign key (id, root_cause_finding_id) →
    // findings (visit_id, id) is hand-written in migration 0017 (drizzle-kit would add it before the unique key it needs).
  ],
);

/**
 * The customer's sign-off at a visit's close-out (one per closed visit, written in the close's transaction):
 * the signer's printed name, when they signed and the signature as PNG bytes (at most 200 KB, decoded on the
 * way in), or — all three null — "customer not available". Kept apart from `visits` so that reading a visit
 * never reads the image. Visits closed before sign-offs were asked have no row.
 */
export const visitSignatures = pgTable(
  'visit_signatures',
  {
    visitId: uuid()
      .primaryKey()
      .references(() => visits.id, { onDelete: 'cascade' }),
    signerName: text(),
    signedAt: instant(),
    imagePng: bytea(),
    /** When the close-out recorded the sign-off (the server's clock). */
    recordedAt: instant().notNull(),
  },
  (t) => [
    check(
      'visit_signatures_signed_ck',
      sql`(${t.signerName} is null and ${t.signedAt} is null and ${t.imagePng} is null) or (${t.signerName} is not null and ${t.signedAt} is not null and ${t.imagePng} is not null)`,
    ),
  ],
);

export const visitEvents = pgTable(
  'visit_events',
  {
    id: id(),
    visitId: uuid()
      .notNull()
      .references(() => visits.id, { onDelete: 'cascade' }),
    state: text().$type<WorkOrderState>().notNull(),
    at: instant().notNull(),
    byUserId: uuid().references(() => users.id),
  },
  (t) => [index('visit_events_visit_idx').on(t.visitId, t.at)],
);

export const readings = pgTable(
  'readings',
  {
    id: id(),
    visitId: uuid()
      .notNull()
      .references(() => visits.id),
    unitId: uuid()
      .notNull()
      .references(() => units.id),
    circuitId: uuid()
      .notNull()
      .references(() => circuits.id),
    takenAt: instant().notNull(),
    refrigerant: text().notNull(),
    /** Reference-gauge values, psig / °F whatever the branch's unit system (converted at the API's edges; DEVELOPERS.md). */
    suctionPressure: doublePrecision(),
    liquidPressure: doublePrecision(),
    dischargePressure: doublePrecision(),
    suctionLineTemp: doublePrecision(),
    liquidLineTemp: doublePrecision(),
    outdoorTemp: doublePrecision(),
    /** What the unit's own controller showed beside each gauge value. */
    suctionPressureController: doublePrecision(),
    liquidPressureController: doublePrecision(),
    dischargePressureController: doublePrecision(),
    /** Computed with @coilpath/calc when saved: °F, superheat and subcooling as °F differences, full precision. */
    suctionSaturationTemp: doublePrecision(),
    liquidSaturationTemp: doublePrecision(),
    superheat: doublePrecision(),
    subcooling: doublePrecision(),
    /** The branch elevation (metres) the saturation temperatures were computed at; the gauge values stay as read. */
    elevationMeters: doublePrecision().notNull().default(0),
    notes: text(),
    createdAt: createdAt(),
  },
  (t) => [
    index('readings_unit_idx').on(t.unitId, t.takenAt),
    index('readings_visit_idx').on(t.visitId),
    // A circuit's latest reading (the briefing) in one index descent, not all of the unit's readings.
    index('readings_circuit_taken_idx').on(t.circuitId, t.takenAt),
  ],
);

export const findings = pgTable(
  'findings',
  {
    id: id(),
    visitId: uuid()
      .notNull()
      .references(() => visits.id),
    unitId: uuid().references(() => units.id),
    causeCode: text().$type<CauseCode>().notNull(),
    origin: text().$type<CauseOrigin>().notNull(),
    alarmCode: text(),
    reportedCircuit: integer(),
    actualCircuit: integer(),
    notes: text(),
    /** Who the finding's notes are for: `internal` (the default) or `customer`. The finding itself is always told in plain words. */
    notesAudience: text().$type<NoteAudience>().notNull().default('internal'),
    createdAt: createdAt(),
  },
  (t) => [
    index('findings_visit_idx').on(t.visitId),
    index('findings_unit_idx').on(t.unitId, t.createdAt),
    unique('findings_visit_id_uq').on(t.visitId, t.id),
  ],
);

export const refrigerantEvents = pgTable(
  'refrigerant_events',
  {
    id: id(),
    unitId: uuid()
      .notNull()
      .references(() => units.id),
    visitId: uuid().references(() => visits.id),
    date: date({ mode: 'string' }).notNull(),
    refrigerant: text().notNull(),
    poundsAdded: doublePrecision().notNull().default(0),
    poundsRecovered: doublePrecision().notNull().default(0),
    reason: text().$type<RefrigerantEventReason>().notNull(),
    /**
     * The circuit the refrigerant went into or came out of, by number, on a unit with several (null: the
     * unit as a whole, or not said). Informational: the leak rate stays per appliance — 40 CFR 82.152 defines
     * it as the rate at which "an appliance" loses refrigerant, against the appliance's full charge.
     */
    circuit: integer(),
    cylinderLot: text(),
    techId: uuid().references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('refrigerant_events_unit_idx').on(t.unitId, t.date)],
);

export const leakCases = pgTable(
  'leak_cases',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    unitId: uuid()
      .notNull()
      .references(() => units.id),
    triggeringEventId: uuid().references(() => refrigerantEvents.id),
    openedOn: date({ mode: 'string' }).notNull(),
    rule: text().notNull(),
    method: text().$type<'annualizing' | 'rolling-average'>().notNull(),
    thresholdPercent: doublePrecision().notNull(),
    leakRatePercent: doublePrecision().notNull(),
    repairDueDate: date({ mode: 'string' }).notNull(),
    chronic: boolean().notNull().default(false),
    status: text().$type<LeakCaseStatus>().notNull().default('open'),
    planKind: text().$type<'retrofit' | 'retire'>(),
    planDueDate: date({ mode: 'string' }),
    repairWorkOrderId: uuid().references(() => workOrders.id),
    repairedOn: date({ mode: 'string' }),
    closedAt: instant(),
    notes: text(),
    createdAt: createdAt(),
    updatedAt: createdAt(),
  },
  (t) => [index('leak_cases_branch_status_idx').on(t.branchId, t.status), index('leak_cases_unit_idx').on(t.unitId)],
);

export const verificationTests = pgTable(
  'verification_tests',
  {
    id: id(),
    leakCaseId: uuid()
      .notNull()
      .references(() => leakCases.id, { onDelete: 'cascade' }),
    kind: text().$type<'initial' | 'follow_up'>().notNull(),
    testedOn: date({ mode: 'string' }).notNull(),
    passed: boolean().notNull(),
    notes: text(),
    byUserId: uuid().references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('verification_tests_case_idx').on(t.leakCaseId)],
);

export const alarms = pgTable(
  'alarms',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    unitId: uuid()
      .notNull()
      .references(() => units.id),
    circuit: integer(),
    code: text().notNull(),
    description: text(),
    raisedAt: instant().notNull(),
    clearedAt: instant(),
    source: text().$type<AlarmSource>().notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('alarms_branch_raised_idx').on(t.branchId, t.raisedAt), index('alarms_unit_raised_idx').on(t.unitId, t.raisedAt)],
);

/**
 * A controller at a site that posts alarms to `POST /api/ingest/alarms/:id`, signed with HMAC-SHA256.
 * HMAC needs the secret itself, so it is kept — encrypted with AES-256-GCM under a key derived from the
 * server's secret (`modules/alarm-sources/secret-box.ts`), never in clear. After a rotation the previous
 * secret stays valid until `previous_valid_until`.
 */
export const alarmSources = pgTable(
  'alarm_sources',
  {
    id: id(),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    siteId: uuid()
      .notNull()
      .references(() => sites.id),
    name: text().notNull(),
    secretBox: text().notNull(),
    previousSecretBox: text(),
    previousValidUntil: instant(),
    disabledAt: instant(),
    createdById: uuid().references(() => users.id),
    rotatedAt: instant(),
    createdAt: createdAt(),
  },
  (t) => [index('alarm_sources_branch_idx').on(t.branchId), index('alarm_sources_site_idx').on(t.siteId)],
);

/**
 * Every request a known alarm source made: `accepted` (an alarm was stored), `unmatched` (signed, but no
 * unit with that tag at the site — a manager maps it), `mapped` (mapped afterwards), `rejected` (refused,
 * with the reason; a rejected delivery never holds its delivery id, so a forged request cannot block a
 * real one). One signed delivery id per source (`alarm_deliveries_source_delivery_uq`).
 */
export const alarmDeliveries = pgTable(
  'alarm_deliveries',
  {
    id: id(),
    sourceId: uuid()
      .notNull()
      .references(() => alarmSources.id),
    branchId: uuid()
      .notNull()
      .references(() => branches.id),
    deliveryId: text(),
    status: text().$type<'accepted' | 'unmatched' | 'mapped' | 'rejected'>().notNull(),
    reason: text(),
    unitTag: text(),
    code: text(),
    circuit: integer(),
    raisedAt: instant(),
    message: text(),
    alarmId: uuid().references(() => alarms.id),
    receivedAt: instant().notNull(),
  },
  (t) => [
    uniqueIndex('alarm_deliveries_source_delivery_uq').on(t.sourceId, t.deliveryId),
    index('alarm_deliveries_source_received_idx').on(t.sourceId, t.receivedAt),
  ],
);

/** The repeat-alarm e-mail: at most one per unit and branch-local day (the primary key claims the day). */
export const repeatAlarmNotices = pgTable(
  'repeat_alarm_notices',
  {
    unitId: uuid()
      .notNull()
      .references(() => units.id),
    day: date({ mode: 'string' }).notNull(),
    code: text().notNull(),
    sentAt: instant().notNull(),
  },
  (t) => [primaryKey({ columns: [t.unitId, t.day] })],
);

export const attachments = pgTable(
  'attachments',
  {
    id: id(),
    visitId: uuid().references(() => visits.id),
    unitId: uuid().references(() => units.id),
    kind: text().$type<AttachmentKind>().notNull(),
    storageKey: text().notNull(),
    thumbnailKey: text(),
    /** The client's file name, cleaned; shown only, never used to store. */
    displayName: text().notNull(),
    contentType: text().notNull(),
    sizeBytes: integer().notNull(),
    uploadedById: uuid().references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('attachments_visit_idx').on(t.visitId), index('attachments_unit_idx').on(t.unitId, t.createdAt)],
);

export const warrantyClaims = pgTable(
  'warranty_claims',
  {
    id: id(),
    workOrderId: uuid()
      .notNull()
      .references(() => workOrders.id),
    status: text().$type<WarrantyClaimStatus>().notNull().default('to_claim'),
    amountCents: integer(),
    reference: text(),
    notes: text(),
    updatedById: uuid().references(() => users.id),
    updatedAt: createdAt(),
  },
  (t) => [uniqueIndex('warranty_claims_work_order_uq').on(t.workOrderId)],
);

export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: id(),
    messageId: text(),
    from: text().notNull(),
    to: text().notNull(),
    subject: text().notNull(),
    text: text(),
    html: text(),
    attachments: jsonb().$type<{ filename: string; contentType: string; size: number; storageKey?: string }[]>().notNull().default([]),
    receivedAt: createdAt(),
  },
  (t) => [index('mail_outbox_received_idx').on(t.receivedAt)],
);

/** Idempotency of scheduled jobs: one row per job and period (e.g. `digest:<branch>:2026-12-02`). */
export const jobRuns = pgTable('job_runs', {
  runKey: text().primaryKey(),
  job: text().notNull(),
  startedAt: createdAt(),
  finishedAt: instant(),
  result: jsonb().$type<Record<string, unknown>>(),
});

export const auditEvents = pgTable(
  'audit_events',
  {
    id: id(),
    actorId: uuid().references(() => users.id),
    action: text().notNull(),
    entity: text().notNull(),
    entityId: uuid(),
    details: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    at: createdAt(),
  },
  (t) => [index('audit_events_entity_idx').on(t.entity, t.entityId)],
);

export const appMeta = pgTable('app_meta', {
  key: text().primaryKey(),
  value: jsonb().$type<unknown>().notNull(),
  updatedAt: instant()
    .notNull()
    .default(sql`now()`),
});
