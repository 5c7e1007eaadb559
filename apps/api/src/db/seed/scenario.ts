import type {
  BookingRule,
  CauseCode,
  CauseOrigin,
  Epa608Type,
  Priority,
  ReturnNeed,
  VisitOutcome,
  WorkingHours,
  WorkOrderKind,
  WorkOrderState,
} from '@coilpath/contract';
import { daysFrom, isRefrigerantId, subcooling, superheat } from '@coilpath/calc';
import type * as t from '../schema';
import {
  addDays,
  addMinutes,
  addMonths,
  hhmmToMinutes,
  localDate,
  month,
  usFederalHolidays,
  wallTime,
  weekday,
  weekdayKey,
  year,
} from './calendar';
import {
  ACCESS_NOTES,
  BRANCHES,
  DEFECT_MODEL,
  MODELS,
  SECOND_DISPATCHER,
  STREETS,
  type BranchDef,
  type CustomerKind,
  type ModelDef,
  type PersonDef,
  type SiteDef,
} from './catalogue';
import { annualizedRate, annualizingDays, coveredBy } from './leak';
import { circuitReading, type CircuitCondition } from './readings';
import { Rng } from './random';
import {
  againComplaint,
  alarmText,
  complaintChoices,
  findingChoices,
  pmFindingChoices,
  renderNote,
  returnFinding,
  returnNote,
  returnText,
  visitNote,
  type Note,
  type UnitWords,
} from './wording';

type Row<T extends { $inferInsert: unknown }> = T['$inferInsert'];

export interface Rows {
  branches: Row<typeof t.branches>[];
  users: Row<typeof t.users>[];
  customers: Row<typeof t.customers>[];
  sites: Row<typeof t.sites>[];
  units: Row<typeof t.units>[];
  circuits: Row<typeof t.circuits>[];
  agreements: Row<typeof t.agreements>[];
  agreementUnits: Row<typeof t.agreementUnits>[];
  workOrders: Row<typeof t.workOrders>[];
  bookings: Row<typeof t.bookings>[];
  visits: Row<typeof t.visits>[];
  visitEvents: Row<typeof t.visitEvents>[];
  readings: Row<typeof t.readings>[];
  findings: Row<typeof t.findings>[];
  refrigerantEvents: Row<typeof t.refrigerantEvents>[];
  leakCases: Row<typeof t.leakCases>[];
  verificationTests: Row<typeof t.verificationTests>[];
  alarms: Row<typeof t.alarms>[];
  warrantyClaims: Row<typeof t.warrantyClaims>[];
}

type Cert = Exclude<Epa608Type, 'none'>;
type WoRow = Row<typeof t.workOrders> & { id: string; createdAt: Date };
type VisitRow = Row<typeof t.visits> & { id: string };

interface Branch {
  def: BranchDef;
  id: string;
  tz: string;
  /** Holidays of every year the scenario spans (scheduling); the branch row stores this and next year's. */
  holidays: Set<string>;
  managerId: string;
  dispatcherId: string;
  techs: Tech[];
  sites: Site[];
  units: Unit[];
}

interface Tech {
  id: string;
  email: string;
  branch: Branch;
  skills: string[];
  cert: Epa608Type;
  hours: WorkingHours;
}

interface Site {
  id: string;
  branch: Branch;
  kind: CustomerKind;
  name: string;
  def: SiteDef;
  units: Unit[];
  /** SLA of the agreement in force today, if any. */
  slaHours: number | null;
  currentAgreementId: string | null;
}

interface Unit {
  id: string;
  branch: Branch;
  site: Site;
  tag: string;
  model: ModelDef;
  refrigerant: string;
  fullChargeLb: number;
  applianceCategory: string;
  installDate: string;
  circuits: { id: string; number: number }[];
  /** Random service calls end before this date (stories own the time after it). */
  quietFrom: string | null;
  /** Only scripted refrigerant events (leak-case and defect stories). */
  scriptedRefrigerant: boolean;
}

interface Slot {
  tech: Tech;
  date: string;
  enRouteAt: Date;
  onSiteAt: Date;
  closedAt: Date;
}

interface FindingSpec {
  unit: Unit | null;
  causeCode: CauseCode;
  origin: CauseOrigin;
  alarmCode?: string | null;
  reportedCircuit?: number | null;
  actualCircuit?: number | null;
  notes: string;
}

interface RefrigerantSpec {
  unit: Unit;
  added?: number;
  recovered?: number;
  reason: Row<typeof t.refrigerantEvents>['reason'];
  /** Scripted amounts are kept as written; random top-offs are trimmed to stay under the leak threshold. */
  scripted?: boolean;
  id?: string;
}

interface VisitSpec {
  outcome: VisitOutcome;
  notes: string;
  returnNeeds?: ReturnNeed[];
  returnNotes?: string;
  findings?: FindingSpec[];
  readings?: { units: Unit[]; conditions?: Record<number, CircuitCondition>; force?: boolean };
  refrigerant?: RefrigerantSpec[];
}

const SEED = 0x0c011a7;
const cents = (x: number) => Math.round(x);
const round05 = (x: number) => Math.round(x * 2) / 2;
const round1 = (x: number) => Math.round(x * 10) / 10;

const FIRST = [
  'Agnes',
  'Bram',
  'Celia',
  'Dorian',
  'Esme',
  'Fintan',
  'Greta',
  'Hamish',
  'Ilse',
  'Jonas',
  'Kerensa',
  'Lorcan',
  'Mireille',
  'Niall',
  'Odile',
  'Percival',
  'Quinn',
  'Rosalind',
  'Soren',
  'Tilde',
  'Ulric',
  'Verity',
  'Wendell',
  'Yara',
];
const LAST = [
  'Thornbury',
  'Koenig',
  'Wandsworth',
  'Achterberg',
  'Bellweather',
  'Castellane',
  'Drummond-Hale',
  'Everard',
  'Fairholme',
  'Gallowglass',
  'Hesketh',
  'Ibbotson',
  'Jessamine',
  'Kilbride',
  'Lockhart',
  'Merriweather',
  'Northcote',
  'Ormsby',
  'Penhallow',
  'Quarrington',
  'Ravensworth',
  'Stavely',
  'Tremayne',
  'Umberleigh',
];

const REFRIGERATION_KINDS = new Set(['walk_in_cooler', 'walk_in_freezer', 'reach_in', 'condensing_unit', 'ice_machine']);
const isRefrigeration = (u: Unit) => REFRIGERATION_KINDS.has(u.model.kind);
const isSmall = (u: Unit) => u.fullChargeLb > 0 && u.fullChargeLb <= 5;
const hasCircuits = (u: Unit) => u.circuits.length > 0;
const words = (u: Unit): UnitWords => ({
  kind: u.model.kind,
  waterCooled: !!u.model.waterCooled,
  circuits: u.circuits.length,
  stages: u.model.circuits * u.model.compressorsPerCircuit,
});

export const DEFECT_FINDING_NOTES =
  'Low-pressure switch of circuit 2 landed on the circuit 1 input at the factory harness, so the controller reported circuit 2’s ' +
  'trips at stage-up as LP1. Re-landed per the wiring diagram and verified LP1 and LP2 trip individually.';

/** Builds every row of the demo scenario anchored to `today` (YYYY-MM-DD). Pure: no I/O. */
export function buildScenario(today: string, passwordHash: string): Rows {
  // Swapped for a generator of its own only while the days of this week before today are filled in (below).
  let rng = new Rng(SEED);
  const rows: Rows = {
    branches: [],
    users: [],
    customers: [],
    sites: [],
    units: [],
    circuits: [],
    agreements: [],
    agreementUnits: [],
    workOrders: [],
    bookings: [],
    visits: [],
    visitEvents: [],
    readings: [],
    findings: [],
    refrigerantEvents: [],
    leakCases: [],
    verificationTests: [],
    alarms: [],
    warrantyClaims: [],
  };
  const historyStart = addDays(today, -730);
  const setupAt = new Date(`${addDays(historyStart, -60)}T15:00:00Z`);
  const thisYear = year(today);
  const phone = (area: string) => `(${area}) 555-01${String(rng.int(0, 99)).padStart(2, '0')}`;
  const offset = (lat: number, lon: number, minKm: number, maxKm: number) => {
    const km = rng.range(minKm, maxKm);
    const a = rng.range(0, Math.PI * 2);
    return {
      lat: round5(lat + (km * Math.sin(a)) / 111),
      lon: round5(lon + (km * Math.cos(a)) / (111 * Math.cos((lat * Math.PI) / 180))),
    };
  };
  const usedTokens = new Set<string>();
  const token = () => {
    let s = rng.hex(40);
    while (usedTokens.has(s)) s = rng.hex(40);
    usedTokens.add(s);
    return s;
  };

  // ───────────────────────── branches and people ─────────────────────────
  const owner = {
    id: rng.uuid(),
    email: 'owner@coilpath.example',
  };
  rows.users.push({
    id: owner.id,
    email: owner.email,
    name: 'Maren Holloway',
    role: 'owner',
    branchId: null,
    passwordHash,
    phone: '(312) 555-0100',
    calendarToken: token(),
    createdAt: setupAt,
  });

  const branches: Branch[] = BRANCHES.map((def) => {
    const holidays = new Set<string>();
    for (let y = thisYear - 3; y <= thisYear + 1; y++) for (const h of usFederalHolidays(y)) holidays.add(h);
    const b: Branch = { def, id: rng.uuid(), tz: def.timeZone, holidays, managerId: '', dispatcherId: '', techs: [], sites: [], units: [] };
    rows.branches.push({
      id: b.id,
      name: def.name,
      code: def.code,
      timeZone: def.timeZone,
      baseAddress: def.baseAddress,
      baseLat: def.baseLat,
      baseLon: def.baseLon,
      holidays: [...usFederalHolidays(thisYear), ...usFederalHolidays(thisYear + 1)],
      labourRateCents: def.labourRateCents,
      refrigerantPriceCentsPerLb: def.refrigerantPriceCentsPerLb,
      currency: 'USD',
      unitSystem: 'imperial',
      sensorTolerancePercent: 3,
      sensorToleranceAbsolute: 5,
      repeatAlarmCount: 2,
      repeatAlarmDays: 30,
      callbackWindowDays: 30,
      digestHour: 7,
      createdAt: setupAt,
      // The contractor on the customer's summary (invented; 555-01xx numbers are reserved for fiction).
      tradingName: `${def.name} Coil & Comfort (demo)`,
      officeAddress: def.baseAddress,
      officePhone: `(${def.areaCode}) 555-0100`,
      licenceNumber: `DEMO-${def.code}-0001`,
      officeEmail: `office.${def.code.toLowerCase()}@coilpath.example`,
    });
    let color = 0;
    for (const p of def.people) addPerson(b, p, color++);
    return b;
  });

  function addPerson(b: Branch, p: PersonDef, color: number) {
    const id = rng.uuid();
    const isTech = p.role === 'technician';
    let hours: WorkingHours | null = null;
    let start: { lat: number; lon: number; address: string } | null = null;
    if (isTech) {
      const h = p.hours ?? { start: '07:00', end: '15:30' };
      const day = { start: h.start, end: h.end };
      hours = {
        sun: null,
        mon: day,
        tue: day,
        wed: day,
        thu: day,
        fri: h.friEnd ? { start: h.start, end: h.friEnd } : day,
        sat: h.sat ?? null,
      };
      if (p.home) {
        const c = offset(b.def.baseLat, b.def.baseLon, 6, 18);
        start = { ...c, address: `${rng.int(100, 9899)} ${rng.pick(STREETS)}, ${b.def.city}, ${b.def.region}` };
      } else {
        start = { lat: b.def.baseLat, lon: b.def.baseLon, address: b.def.baseAddress };
      }
    }
    rows.users.push({
      id,
      email: p.email,
      name: p.name,
      role: p.role,
      branchId: b.id,
      passwordHash,
      phone: phone(b.def.areaCode),
      skills: p.skills ?? [],
      epa608Type: isTech ? (p.epa608 ?? 'universal') : 'none',
      epa608Number: isTech ? `${b.def.code}${rng.int(100000, 999999)}-608` : null,
      workingHours: hours,
      startAddress: start?.address ?? null,
      startLat: start?.lat ?? null,
      startLon: start?.lon ?? null,
      colorIndex: isTech ? color - 2 : 0,
      calendarToken: token(),
      createdAt: setupAt,
    });
    if (p.role === 'branch_manager') b.managerId = id;
    if (p.role === 'dispatcher') b.dispatcherId = id;
    if (isTech) b.techs.push({ id, email: p.email, branch: b, skills: p.skills ?? [], cert: p.epa608 ?? 'universal', hours: hours! });
  }

  // ───────────────────────── customers, sites, units ─────────────────────────
  const serials = new Set<string>();
  for (const b of branches) {
    for (const c of b.def.customers) {
      const customerId = rng.uuid();
      rows.customers.push({
        id: customerId,
        branchId: b.id,
        name: c.name,
        contactName: c.contact,
        contactEmail: `facilities@${c.domain}`,
        contactPhone: phone(b.def.areaCode),
        billingAddress: `${rng.int(100, 9899)} ${rng.pick(STREETS)}, ${b.def.city}, ${b.def.region} ${rng.pick(b.def.postalCodes)}`,
        createdAt: setupAt,
      });
      for (const sd of c.sites) {
        const siteId = rng.uuid();
        const at = offset(b.def.baseLat, b.def.baseLon, 3, 22);
        const first = rng.pick(FIRST);
        const last = rng.pick(LAST);
        const site: Site = {
          id: siteId,
          branch: b,
          kind: c.kind,
          name: sd.name,
          def: sd,
          units: [],
          slaHours: null,
          currentAgreementId: null,
        };
        rows.sites.push({
          id: siteId,
          branchId: b.id,
          customerId,
          name: sd.name,
          address: `${rng.int(100, 9899)} ${rng.pick(STREETS)}`,
          city: b.def.city,
          region: b.def.region,
          postalCode: rng.pick(b.def.postalCodes),
          lat: at.lat,
          lon: at.lon,
          accessNotes: rng.pick(ACCESS_NOTES[c.kind]),
          contactName: `${first} ${last}`,
          contactEmail: `${first}.${last}`.toLowerCase().replace(/[^a-z.]/g, '') + `@${c.domain}`,
          contactPhone: phone(b.def.areaCode),
          createdAt: setupAt,
        });
        b.sites.push(site);
        for (const [m, tag] of equipmentFor(c.kind, sd)) addUnit(site, m, tag);
      }
    }
  }

  function equipmentFor(kind: CustomerKind, sd: SiteDef): [ModelDef, string][] {
    const list: [ModelDef, string][] = [];
    const rtuPool = [MODELS.rtuSmall!, MODELS.rtuMid!, MODELS.rtuMid!, MODELS.rtuLarge!, MODELS.rtuNew!];
    const rtus = (n: number) => {
      for (let i = 1; i <= n; i++) list.push([i === 1 && sd.defectModel ? MODELS.defectRtu! : rng.pick(rtuPool), `RTU-${i}`]);
    };
    switch (kind) {
      case 'office':
        if (sd.special === 'leak-chiller') list.push([MODELS.chiller!, 'CH-1']);
        rtus(rng.int(2, 3));
        if (rng.chance(0.35)) list.push([MODELS.split!, 'SS-1']);
        break;
      case 'school':
        if (sd.special === 'r22-chiller') list.push([MODELS.chillerR22!, 'CH-1']);
        if (sd.name.startsWith('Tollmarsh')) list.push([MODELS.chillerR134!, 'CH-1']);
        rtus(2);
        if (rng.chance(0.5)) list.push([MODELS.boiler!, 'B-1']);
        break;
      case 'grocery':
        rtus(1);
        list.push([rng.pick([MODELS.walkInCooler!, MODELS.walkInCooler!, MODELS.walkInCoolerOld!, MODELS.walkInCooler407!]), 'WIC-1']);
        list.push([MODELS.walkInFreezer!, 'WIF-1']);
        list.push([MODELS.reachIn!, 'RI-1']);
        if (rng.chance(0.25)) list.push([MODELS.reachIn!, 'RI-2']);
        break;
      case 'restaurant':
        list.push([MODELS.rtuSmall!, 'RTU-1']);
        list.push([rng.chance(0.5) ? MODELS.walkInCoolerOld! : MODELS.walkInCooler407!, 'WIC-1']);
        if (rng.chance(0.5)) list.push([MODELS.walkInFreezer!, 'WIF-1']);
        list.push([MODELS.reachIn!, 'RI-1']);
        if (rng.chance(0.35)) list.push([MODELS.iceMachine!, 'IM-1']);
        break;
      case 'clinic':
        rtus(rng.int(1, 2));
        list.push([sd.name.endsWith('Pellham') || sd.name.endsWith('Rushlight') ? MODELS.splitR22! : MODELS.split!, 'SS-1']);
        break;
      case 'cold_storage':
        list.push([MODELS.warehouseFreezer!, 'CU-1']);
        list.push([MODELS.walkInCooler!, 'WIC-1']);
        list.push([MODELS.rtuSmall!, 'RTU-1']);
        break;
    }
    return list;
  }

  function addUnit(site: Site, m: ModelDef, tag: string) {
    const id = rng.uuid();
    const y = rng.int(m.installYears[0], m.installYears[1]);
    const installDate = `${y}-${String(rng.int(1, 12)).padStart(2, '0')}-${String(rng.int(1, 28)).padStart(2, '0')}`;
    let charge = m.charge[0] === m.charge[1] ? m.charge[0] : rng.range(m.charge[0], m.charge[1]);
    charge = m.charge[1] <= 5 ? round1(charge) : round05(charge);
    if (site.def.special === 'leak-walk-in' && tag === 'WIF-1') charge = 28;
    let serial: string;
    do serial = `${m.serialPrefix}-${installDate.slice(2, 4)}${installDate.slice(5, 7)}-${rng.int(10000, 99999)}`;
    while (serials.has(`${m.make}|${serial}`));
    serials.add(`${m.make}|${serial}`);
    const unit: Unit = {
      id,
      branch: site.branch,
      site,
      tag,
      model: m,
      refrigerant: m.refrigerant,
      fullChargeLb: charge,
      applianceCategory: m.category,
      installDate,
      circuits: [],
      quietFrom: null,
      scriptedRefrigerant: false,
    };
    rows.units.push({
      id,
      branchId: site.branch.id,
      siteId: site.id,
      tag,
      kind: m.kind,
      make: m.make,
      model: m.model,
      serial,
      installDate,
      warrantyEnd: addMonths(installDate, 12 * m.warrantyYears),
      refrigerant: m.refrigerant,
      fullChargeLb: charge,
      applianceCategory: m.category,
      tonnage: m.tonnage,
      notes: m.refrigerant === 'R-22' ? 'Legacy R-22 system: service with reclaimed R-22 only; replacement quoted.' : null,
      createdAt: setupAt,
    });
    for (let n = 1; n <= m.circuits; n++) {
      const cid = rng.uuid();
      unit.circuits.push({ id: cid, number: n });
      rows.circuits.push({
        id: cid,
        unitId: id,
        number: n,
        compressorCount: m.compressorsPerCircuit,
        chargeLb: round1(charge / m.circuits),
      });
    }
    site.units.push(unit);
    site.branch.units.push(unit);
  }

  // ───────────────────────── scheduling helpers ─────────────────────────
  const cursors = new Map<string, number>();
  const hoursOn = (tech: Tech, date: string) => {
    const h = tech.hours[weekdayKey(date)];
    return h ? { start: hhmmToMinutes(h.start), end: hhmmToMinutes(h.end) } : null;
  };
  const certOk = (have: Epa608Type, need: Cert | null | undefined) => !need || have === 'universal' || have === need;
  const qualifies = (tech: Tech, req: { skill?: string | null; cert?: Cert | null }) =>
    (!req.skill || tech.skills.includes(req.skill)) && certOk(tech.cert, req.cert);
  const isWorkday = (b: Branch, d: string) => weekday(d) >= 1 && weekday(d) <= 5 && !b.holidays.has(d);
  const nextWorkday = (b: Branch, d: string) => {
    let x = d;
    while (!isWorkday(b, x)) x = addDays(x, 1);
    return x;
  };
  const prevWorkday = (b: Branch, d: string) => {
    let x = d;
    while (!isWorkday(b, x)) x = addDays(x, -1);
    return x;
  };

  /** Finds a technician and a time on `date` (or a following day) for a job of `minutes` on site. */
  function place(
    b: Branch,
    date: string,
    minutes: number,
    req: { skill?: string | null; cert?: Cert | null; tech?: Tech; exact?: boolean } = {},
  ): Slot | null {
    for (let d = 0; d <= (req.exact ? 0 : 12); d++) {
      const day = addDays(date, d);
      if (b.holidays.has(day) && !req.exact) continue;
      const candidates = req.tech ? [req.tech] : rng.shuffle(b.techs.filter((x) => qualifies(x, req)));
      for (const tech of candidates) {
        const h = hoursOn(tech, day);
        if (!h) continue;
        const key = `${tech.id}|${day}`;
        const cur = cursors.get(key) ?? h.start + rng.int(0, 2) * 15;
        const travel = rng.int(15, 40);
        const onSite = cur + travel;
        if (cur > h.start + 30 && onSite + minutes > h.end + 30) continue;
        if (onSite + minutes >= 23 * 60) continue;
        cursors.set(key, onSite + minutes + rng.int(0, 10));
        return {
          tech,
          date: day,
          enRouteAt: wallTime(day, cur, b.tz),
          onSiteAt: wallTime(day, onSite, b.tz),
          closedAt: wallTime(day, onSite + minutes, b.tz),
        };
      }
    }
    return null;
  }

  const outdoorOn = (b: Branch, date: string) => b.def.climate[month(date) - 1]! - rng.range(0, 9);
  const slaFor = (site: Site, priority: Priority) =>
    priority === 'emergency' ? 4 : (site.slaHours ?? (isRefrigerationSite(site) ? 8 : 48));
  const isRefrigerationSite = (s: Site) => s.kind === 'grocery' || s.kind === 'restaurant' || s.kind === 'cold_storage';
  const skillFor = (u: Unit | null): string | null => {
    if (!u) return null;
    if (u.model.kind === 'chiller') return 'chiller';
    if (u.model.kind === 'boiler') return 'boiler';
    if (isRefrigeration(u)) return 'refrigeration';
    return null;
  };

  function newWorkOrder(v: {
    branch: Branch;
    site: Site;
    unit: Unit | null;
    kind: WorkOrderKind;
    state: WorkOrderState;
    createdAt: Date;
    priority?: Priority;
    complaint: string;
    estimatedMinutes: number;
    agreementId?: string | null;
    plannedDate?: string | null;
    originWorkOrderId?: string | null;
    requiredSkill?: string | null;
    requiredCertification?: Cert | null;
    returnNeeds?: ReturnNeed[];
    latestAt?: Date | null;
    slaDueAt?: Date | null;
    leakCaseId?: string | null;
    purpose?: string | null;
  }): WoRow {
    const priority = v.priority ?? 'normal';
    const wo: WoRow = {
      id: rng.uuid(),
      branchId: v.branch.id,
      siteId: v.site.id,
      unitId: v.unit?.id ?? null,
      agreementId: v.agreementId ?? null,
      kind: v.kind,
      state: v.state,
      priority,
      complaint: v.complaint,
      slaDueAt:
        v.slaDueAt !== undefined
          ? v.slaDueAt
          : v.kind === 'planned_maintenance'
            ? null
            : addMinutes(v.createdAt, 60 * slaFor(v.site, priority)),
      latestAt: v.latestAt ?? null,
      plannedDate: v.plannedDate ?? null,
      requiredSkill: v.requiredSkill ?? null,
      requiredCertification: v.requiredCertification ?? null,
      estimatedMinutes: v.estimatedMinutes,
      originWorkOrderId: v.originWorkOrderId ?? null,
      leakCaseId: v.leakCaseId ?? null,
      returnNeeds: v.returnNeeds ?? [],
      purpose: v.purpose ?? null,
      outcome: null,
      createdById: v.branch.dispatcherId,
      createdAt: v.createdAt,
      updatedAt: v.createdAt,
      closedAt: null,
    };
    rows.workOrders.push(wo);
    return wo;
  }

  /** Work booked against a booking rule on purpose (a story says which and why), by the branch's dispatcher. */
  const bookedAgainst = new Map<string, { rules: BookingRule[]; reason: string }>();

  function book(wo: WoRow, tech: Tech, startAt: Date, endAt: Date, bookedAt: Date) {
    const bookingId = rng.uuid();
    const against = bookedAgainst.get(wo.id);
    rows.bookings.push({
      id: bookingId,
      branchId: wo.branchId,
      workOrderId: wo.id,
      techId: tech.id,
      startAt,
      endAt,
      version: 1,
      ...(against
        ? {
            overrideRules: against.rules,
            hoursOverride: against.rules.includes('working_hours'),
            overrideReason: against.reason,
            overrideById: tech.branch.dispatcherId,
          }
        : {}),
      createdById: tech.branch.dispatcherId,
      createdAt: bookedAt,
      updatedAt: bookedAt,
    });
    const visit: VisitRow = {
      id: rng.uuid(),
      branchId: wo.branchId,
      workOrderId: wo.id,
      bookingId,
      techId: tech.id,
      returnNeeds: [],
      version: 1,
      createdAt: bookedAt,
      updatedAt: bookedAt,
    };
    rows.visits.push(visit);
    return visit;
  }

  /** Books, runs and closes a visit in a slot, with readings, findings and refrigerant. */
  function runVisit(wo: WoRow, slot: Slot, spec: VisitSpec): VisitRow {
    const b = slot.tech.branch;
    const bookedAt = new Date(Math.min(wo.createdAt.getTime() + rng.int(10, 120) * 60_000, slot.enRouteAt.getTime() - 5 * 60_000));
    const visit = book(
      wo,
      slot.tech,
      slot.onSiteAt,
      addMinutes(slot.onSiteAt, wo.estimatedMinutes ?? 60),
      new Date(Math.max(bookedAt.getTime(), wo.createdAt.getTime())),
    );
    visit.enRouteAt = slot.enRouteAt;
    visit.onSiteAt = slot.onSiteAt;
    visit.closedAt = slot.closedAt;
    visit.outcome = spec.outcome;
    visit.returnNeeds = spec.returnNeeds ?? [];
    visit.returnNotes = spec.returnNotes ?? null;
    visit.notes = spec.notes;
    visit.labourMinutes = Math.round((slot.closedAt.getTime() - slot.enRouteAt.getTime()) / 60_000);
    visit.version = 4;
    visit.updatedAt = slot.closedAt;
    for (const [state, at] of [
      ['en_route', slot.enRouteAt],
      ['on_site', slot.onSiteAt],
      ['closed', slot.closedAt],
    ] as const) {
      rows.visitEvents.push({ id: rng.uuid(), visitId: visit.id, state, at, byUserId: slot.tech.id });
    }
    wo.state = 'closed';
    wo.outcome = spec.outcome;
    wo.closedAt = slot.closedAt;
    wo.updatedAt = slot.closedAt;

    const onSiteMinutes = (slot.closedAt.getTime() - slot.onSiteAt.getTime()) / 60_000;
    if (spec.readings) {
      const outdoor = outdoorOn(b, slot.date);
      for (const u of spec.readings.units) {
        if (!hasCircuits(u) || u.installDate > slot.date) continue;
        if (!spec.readings.force && !isRefrigeration(u) && outdoor < 55) continue;
        const takenAt = addMinutes(slot.onSiteAt, Math.min(rng.int(15, 45), Math.max(5, onSiteMinutes - 5)));
        for (const c of u.circuits) {
          const v = circuitReading(
            rng,
            { kind: u.model.kind, refrigerant: u.refrigerant },
            outdoor,
            spec.readings.conditions?.[c.number] ?? 'normal',
          );
          rows.readings.push({
            id: rng.uuid(),
            visitId: visit.id,
            unitId: u.id,
            circuitId: c.id,
            takenAt,
            refrigerant: u.refrigerant,
            ...v,
            createdAt: takenAt,
          });
        }
      }
    }
    for (const f of spec.findings ?? []) {
      rows.findings.push({
        id: rng.uuid(),
        visitId: visit.id,
        unitId: f.unit?.id ?? null,
        causeCode: f.causeCode,
        origin: f.origin,
        alarmCode: f.alarmCode ?? null,
        reportedCircuit: f.reportedCircuit ?? null,
        actualCircuit: f.actualCircuit ?? null,
        notes: f.notes,
        createdAt: slot.closedAt,
      });
    }
    for (const r of spec.refrigerant ?? []) {
      pendingRefrigerant.push({
        spec: r,
        row: {
          id: r.id ?? rng.uuid(),
          unitId: r.unit.id,
          visitId: visit.id,
          date: localDate(slot.closedAt, b.tz),
          refrigerant: r.unit.refrigerant,
          poundsAdded: r.added ?? 0,
          poundsRecovered: r.recovered ?? 0,
          reason: r.reason,
          cylinderLot: cylinderLot(r.unit.refrigerant, slot.date),
          techId: slot.tech.id,
          createdAt: slot.closedAt,
        },
      });
    }
    return visit;
  }

  const findingOf = (visitId: string) => rows.findings.find((f) => f.visitId === visitId)!;
  /** "superheat 27 °F, subcooling 3 °F" of a visit's reading on a circuit, computed as the seed stores them; null without one. */
  const chargeFigures = (visitId: string, circuitId: string): string | null => {
    const r = rows.readings.find((x) => x.visitId === visitId && x.circuitId === circuitId);
    if (
      !r ||
      !isRefrigerantId(r.refrigerant) ||
      r.suctionPressure == null ||
      r.suctionLineTemp == null ||
      r.liquidPressure == null ||
      r.liquidLineTemp == null
    )
      return null;
    try {
      const sh = superheat({
        refrigerant: r.refrigerant,
        suctionPressure: r.suctionPressure,
        suctionLineTemp: r.suctionLineTemp,
      }).superheat;
      const sc = subcooling({ refrigerant: r.refrigerant, liquidPressure: r.liquidPressure, liquidLineTemp: r.liquidLineTemp }).subcooling;
      return `superheat ${Math.round(sh)} °F, subcooling ${Math.round(sc)} °F`;
    } catch {
      return null;
    }
  };
  const pendingRefrigerant: { spec: RefrigerantSpec; row: Row<typeof t.refrigerantEvents> & { id: string; date: string } }[] = [];
  const cylinderLot = (refrigerant: string, date: string) =>
    `${refrigerant.replace('-', '')}-${date.slice(2, 4)}${'ABCDEFGHJK'[rng.int(0, 9)]}-${String(rng.int(1, 9999)).padStart(4, '0')}`;

  function alarm(u: Unit, code: string, circuit: number | null, raisedAt: Date, clearedAt: Date | null) {
    rows.alarms.push({
      id: rng.uuid(),
      branchId: u.branch.id,
      unitId: u.id,
      circuit,
      code,
      description: alarmText(u.model.kind, code),
      raisedAt,
      clearedAt,
      source: 'controller',
      createdAt: raisedAt,
    });
  }

  // ───────────────────────── service-call vocabulary ─────────────────────────
  const CAUSES_COMFORT: [CauseCode, number][] = [
    ['refrigerant_leak', 16],
    ['sensor_fault', 10],
    ['wiring_fault', 5],
    ['control_fault', 10],
    ['component_failure', 26],
    ['airflow', 15],
    ['settings', 8],
    ['no_fault_found', 10],
  ];
  const CAUSES_CHILLER: [CauseCode, number][] = [
    ['refrigerant_leak', 22],
    ['sensor_fault', 15],
    ['wiring_fault', 5],
    ['control_fault', 20],
    ['component_failure', 28],
    ['no_fault_found', 10],
  ];
  const CAUSES_REFRIG: [CauseCode, number][] = [
    ['refrigerant_leak', 22],
    ['sensor_fault', 8],
    ['control_fault', 10],
    ['component_failure', 30],
    ['airflow', 15],
    ['settings', 5],
    ['no_fault_found', 10],
  ];
  const CAUSES_BOILER: [CauseCode, number][] = [
    ['component_failure', 50],
    ['control_fault', 20],
    ['settings', 10],
    ['wiring_fault', 10],
    ['no_fault_found', 10],
  ];
  const ORIGINS: Record<CauseCode, [CauseOrigin, number][]> = {
    refrigerant_leak: [
      ['wear', 70],
      ['installation', 15],
      ['prior_service', 15],
    ],
    sensor_fault: [
      ['wear', 75],
      ['installation', 15],
      ['external', 10],
    ],
    wiring_fault: [
      ['installation', 40],
      ['wear', 40],
      ['external', 20],
    ],
    control_fault: [
      ['wear', 55],
      ['prior_service', 20],
      ['external', 25],
    ],
    component_failure: [
      ['wear', 90],
      ['installation', 5],
      ['external', 5],
    ],
    airflow: [
      ['wear', 55],
      ['external', 45],
    ],
    settings: [
      ['prior_service', 45],
      ['external', 55],
    ],
    no_fault_found: [['external', 100]],
  };
  function causesFor(u: Unit) {
    if (u.model.kind === 'boiler') return CAUSES_BOILER;
    if (u.model.kind === 'chiller') return CAUSES_CHILLER;
    if (isRefrigeration(u)) return CAUSES_REFRIG;
    return CAUSES_COMFORT;
  }
  /**
   * The alarm a cause raises on a unit. Refrigeration calls: a short charge shows as low suction or a warm box
   * (one draw picks, whatever the kind can raise); reach-ins raise only their temperature alarm and ice machines
   * their cycle-time faults.
   */
  function alarmFor(u: Unit, cause: CauseCode, circuit: number): string | null {
    const kind = u.model.kind;
    if (kind === 'boiler') return null;
    if (isRefrigeration(u)) {
      const warm = kind === 'ice_machine' ? 'LONG-FRZ' : 'HI-TEMP';
      if (cause === 'refrigerant_leak') {
        const low = rng.chance(0.5);
        return low && kind !== 'reach_in' && kind !== 'ice_machine' ? `LP${circuit}` : warm;
      }
      if (cause === 'control_fault') return kind === 'ice_machine' ? 'LONG-HRV' : kind === 'reach_in' ? 'HI-TEMP' : 'COMM';
      if (cause === 'settings') return null;
      return warm;
    }
    switch (cause) {
      case 'refrigerant_leak':
      case 'no_fault_found':
        return `LP${circuit}`;
      case 'sensor_fault':
      case 'component_failure':
        return rng.pick([`LP${circuit}`, `HP${circuit}`]);
      case 'wiring_fault':
        return rng.pick(['COMM', `HP${circuit}`]);
      case 'control_fault':
        return 'COMM';
      case 'airflow':
        return rng.pick(['FRZ', `HP${circuit}`]);
      default:
        return null;
    }
  }
  /** What the site phoned in: the alarm when there was one, else a complaint that fits the unit (and the cause, when known). */
  function complaintFor(u: Unit | null, code: string | null, cause?: CauseCode): string {
    if (code) return `${code} alarm — ${u ? alarmText(u.model.kind, code) : code}`;
    if (!u) return 'Site reports a comfort problem';
    return rng.pick(complaintChoices(words(u), cause));
  }
  /** A callback repeats the complaint of the call it came back to; a fresh complaint is still drawn, to keep the generator in step. */
  function callbackComplaint(u: Unit, previous: string | undefined): string {
    const fresh = complaintFor(u, null);
    return againComplaint(previous || fresh);
  }
  const needsRefrigerantWork = (u: Unit, cause: CauseCode) =>
    hasCircuits(u) && !isSmall(u) && (cause === 'refrigerant_leak' || cause === 'component_failure' || cause === 'sensor_fault');
  const minutesFor = (u: Unit | null) => {
    if (!u) return 90;
    switch (u.model.kind) {
      case 'chiller':
        return rng.int(150, 300);
      case 'reach_in':
      case 'ice_machine':
        return rng.int(40, 75);
      case 'boiler':
        return rng.int(75, 150);
      default:
        return rng.int(60, 150);
    }
  };

  interface CallResult {
    wo: WoRow;
    visit: VisitRow;
    slot: Slot;
  }

  /**
   * A service call (or callback, or return visit) closed on a date: work order, alarm, visit, readings,
   * findings and refrigerant. Returns null when no technician was free.
   */
  function closedCall(v: {
    unit: Unit;
    date: string;
    kind?: WorkOrderKind;
    cause?: CauseCode;
    origin?: CauseOrigin;
    outcome?: VisitOutcome;
    circuit?: number;
    originWorkOrderId?: string;
    returnNeeds?: ReturnNeed[];
    exact?: boolean;
    tech?: Tech;
    findingNotes?: string;
    visitNotes?: string;
    /** A draw made by the caller, in place of the one picking the finding note (a callback's "same problem" note). */
    findingDraw?: number;
    againComplaint?: string;
    alarmCode?: string | null;
    complaint?: string;
    finding?: FindingSpec | null;
    extraFindings?: FindingSpec[];
    refrigerant?: RefrigerantSpec[];
    conditions?: Record<number, CircuitCondition>;
    priority?: Priority;
    minutes?: number;
    leakCaseId?: string;
    wantsReturn?: ReturnNeed[];
    returnNotes?: string;
    requiredSkill?: string | null;
    notBefore?: Date;
  }): CallResult | null {
    const u = v.unit;
    const b = u.branch;
    const cause = v.cause ?? rng.weighted(causesFor(u));
    const circuit = v.circuit ?? (u.circuits.length > 1 ? rng.int(1, u.circuits.length) : 1);
    const needCert: Cert | null = needsRefrigerantWork(u, cause) ? 'II' : null;
    const minutes = v.minutes ?? minutesFor(u);
    const slot = place(b, v.date, minutes, {
      cert: needCert,
      skill: v.requiredSkill === undefined ? skillFor(u) : v.requiredSkill,
      tech: v.tech,
      exact: v.exact,
    });
    if (!slot) return null;
    const kind = v.kind ?? 'service_call';
    const code =
      v.alarmCode !== undefined ? v.alarmCode : kind === 'return_visit' ? null : rng.chance(0.65) ? alarmFor(u, cause, circuit) : null;
    const lead = kind === 'return_visit' ? rng.int(24 * 60, 72 * 60) : rng.int(40, 20 * 60);
    let createdAt = addMinutes(slot.enRouteAt, -lead);
    if (v.notBefore && createdAt < v.notBefore)
      createdAt = addMinutes(v.notBefore, Math.min(30, Math.max(1, (slot.enRouteAt.getTime() - v.notBefore.getTime()) / 120_000)));
    const priority: Priority =
      v.priority ??
      (isRefrigeration(u) && cause !== 'settings'
        ? rng.pick<Priority>(['high', 'emergency'])
        : rng.weighted<Priority>([
            ['normal', 70],
            ['high', 25],
            ['low', 5],
          ]));
    const wo = newWorkOrder({
      branch: b,
      site: u.site,
      unit: u,
      kind,
      state: 'booked',
      createdAt,
      priority,
      complaint:
        v.complaint ??
        (kind === 'return_visit'
          ? `Return visit: ${returnText(v.returnNeeds ?? ['parts'])}`
          : v.againComplaint !== undefined && !code
            ? callbackComplaint(u, v.againComplaint)
            : complaintFor(u, code, cause)),
      estimatedMinutes: Math.round(minutes / 15) * 15 || 60,
      originWorkOrderId: v.originWorkOrderId ?? null,
      requiredSkill: v.requiredSkill === undefined ? (rng.chance(0.5) ? skillFor(u) : null) : v.requiredSkill,
      requiredCertification: needCert && rng.chance(0.6) ? needCert : null,
      returnNeeds: v.returnNeeds ?? [],
      leakCaseId: v.leakCaseId ?? null,
    });
    if (code) {
      const raised = addMinutes(createdAt, -rng.int(3, 40));
      alarm(u, code, /\d$/.test(code) ? Number(code.slice(-1)) : null, raised, addMinutes(slot.onSiteAt, rng.int(10, 40)));
    }
    let outcome = v.outcome;
    if (!outcome) {
      const pReturn = cause === 'refrigerant_leak' ? 0.2 : cause === 'component_failure' ? 0.16 : cause === 'control_fault' ? 0.06 : 0.02;
      const pDecline = cause === 'component_failure' ? 0.08 : 0.01;
      const r = rng.next();
      outcome = r < pReturn ? 'needs_return' : r < pReturn + pDecline ? 'declined' : 'resolved';
    }
    const origin = v.origin ?? rng.weighted(ORIGINS[cause]);
    const topsOff = !v.refrigerant && cause === 'refrigerant_leak' && hasCircuits(u) && !u.scriptedRefrigerant && kind !== 'return_visit';
    // The note fits the unit, the alarm and how the visit ends; one draw picks it from whichever list that leaves.
    let note: Note | null = null;
    const pickNote = (): string => {
      const leakSearch =
        cause === 'refrigerant_leak' && outcome === 'needs_return' && (v.wantsReturn ?? ['leak_search']).includes('leak_search');
      const choices = findingChoices(words(u), cause, code, { outcome: outcome!, leakSearch, toppedOff: topsOff });
      note = v.findingDraw !== undefined ? choices[Math.floor(v.findingDraw * choices.length)]! : rng.pick(choices);
      return `${v.findingDraw !== undefined ? 'Same problem as the last visit. ' : ''}${renderNote(note, circuit, outcome!)}`;
    };
    const finding: FindingSpec | null =
      v.finding !== undefined
        ? v.finding
        : {
            unit: u,
            causeCode: cause,
            origin,
            alarmCode: code,
            reportedCircuit: code && /\d$/.test(code) ? circuit : null,
            actualCircuit: code && /\d$/.test(code) ? circuit : null,
            notes: v.findingNotes ?? pickNote(),
          };
    const picked = note as Note | null;
    const refrigerant: RefrigerantSpec[] = v.refrigerant ?? [];
    if (topsOff) {
      const lb = isSmall(u) ? round1(rng.range(0.2, 0.5)) : round1(u.fullChargeLb * rng.range(0.03, 0.08));
      refrigerant.push({ unit: u, added: Math.max(lb, 0.2), reason: 'leak_top_off' });
    }
    const returnNeeds =
      outcome === 'needs_return'
        ? (v.wantsReturn ??
          (cause === 'refrigerant_leak'
            ? ['leak_search']
            : cause === 'component_failure'
              ? rng.pick<ReturnNeed[]>([['parts'], ['parts', 'second_tech']])
              : ['parts']))
        : [];
    const toppedOff = refrigerant.some((r) => (r.added ?? 0) > 0);
    // A leak is short of charge until a return visit has repaired it; a suction transducer reading high shows
    // in the readings only when the note blames one (the other conditions make the same draws).
    const condition: CircuitCondition | null =
      cause === 'refrigerant_leak'
        ? kind === 'return_visit'
          ? 'recharged'
          : 'low_charge'
        : cause === 'sensor_fault'
          ? kind !== 'return_visit' && picked?.drift
            ? 'sensor_drift'
            : 'sensor_elsewhere'
          : null;
    const visit = runVisit(wo, slot, {
      outcome,
      notes: v.visitNotes ?? visitNote(words(u), outcome, cause, returnNeeds, { alarmCode: code, toppedOff }),
      returnNeeds,
      returnNotes: outcome === 'needs_return' ? (v.returnNotes ?? returnNote(words(u), returnNeeds)) : undefined,
      findings: [...(finding ? [finding] : []), ...(v.extraFindings ?? [])],
      readings: hasCircuits(u)
        ? {
            units: [u],
            conditions: v.conditions ?? (condition ? { [circuit]: condition } : {}),
            force: cause === 'refrigerant_leak' || cause === 'sensor_fault' || !!v.conditions,
          }
        : undefined,
      refrigerant,
    });
    return { wo, visit, slot };
  }

  /** After a service call: its return visit, or sometimes a callback. Keeps everything before `horizon`. */
  function followUps(first: CallResult, cause: CauseCode, horizon: string, allowCallback = true) {
    const u = first.wo.unitId ? unitById.get(first.wo.unitId)! : null;
    if (!u) return;
    const closedOn = first.slot.date;
    if (first.wo.outcome === 'needs_return') {
      const d = addDays(closedOn, rng.int(3, 10));
      if (d >= horizon) return;
      closedCall({
        unit: u,
        date: d,
        kind: 'return_visit',
        cause,
        outcome: rng.chance(0.93) ? 'resolved' : 'declined',
        originWorkOrderId: first.wo.id,
        returnNeeds: first.visit.returnNeeds as ReturnNeed[],
        alarmCode: null,
        priority: 'normal',
        minutes: rng.int(90, 200),
        findingNotes: returnFinding(words(u), cause),
        refrigerant: [],
        notBefore: first.slot.closedAt,
      });
      return;
    }
    if (allowCallback && first.wo.outcome === 'resolved' && rng.chance(0.085)) {
      const d = addDays(closedOn, rng.int(3, 25));
      if (d >= horizon) return;
      const sameCause = rng.chance(0.6);
      const cbCause = sameCause ? cause : rng.weighted(causesFor(u));
      const cb = closedCall({
        unit: u,
        date: d,
        kind: 'callback',
        cause: cbCause,
        originWorkOrderId: first.wo.id,
        priority: 'high',
        againComplaint: first.wo.complaint,
        outcome: rng.chance(0.85) ? 'resolved' : 'needs_return',
        notBefore: addMinutes(first.slot.closedAt, 3 * 24 * 60),
        findingDraw: sameCause ? rng.next() : undefined,
      });
      if (cb) followUps(cb, cbCause, horizon, false);
    }
  }
  const unitById = new Map<string, Unit>();
  for (const b of branches) for (const u of b.units) unitById.set(u.id, u);

  // ───────────────────────── agreements ─────────────────────────
  type Plan = 'monthly' | 'quarterly' | 'biannual';
  interface Term {
    id: string;
    site: Site;
    plan: Plan;
    day: number;
    start: string;
    end: string;
    minutes: number;
    name: string;
    units: Unit[];
  }
  const terms: Term[] = [];
  const PM_MINUTES: Record<string, number> = {
    rooftop_unit: 60,
    split_system: 45,
    chiller: 240,
    walk_in_cooler: 60,
    walk_in_freezer: 60,
    reach_in: 20,
    ice_machine: 30,
    condensing_unit: 120,
    boiler: 90,
    heat_pump: 45,
  };
  const PM_PRICE: Record<string, number> = {
    rooftop_unit: 21_000,
    split_system: 14_000,
    chiller: 95_000,
    walk_in_cooler: 16_000,
    walk_in_freezer: 17_500,
    reach_in: 6_000,
    ice_machine: 9_000,
    condensing_unit: 38_000,
    boiler: 30_000,
    heat_pump: 14_000,
  };
  const TASKS: Record<Plan, string[]> = {
    monthly: [
      'Check box temperatures and door gaskets',
      'Inspect evaporator for ice; verify defrost',
      'Clean condenser coil',
      'Record suction and liquid pressures',
      'Leak check with electronic detector',
    ],
    quarterly: [
      'Replace filters',
      'Check belts and sheaves',
      'Clean condensate pan and trap',
      'Record pressures and line temperatures per circuit',
      'Check economizer operation',
    ],
    biannual: [
      'Spring: cooling start-up, coil wash, pressures per circuit',
      'Autumn: heat exchanger inspection, burner and ignition check',
      'Replace filters',
      'Check belts',
    ],
  };
  /** A planned visit's summary: the plan's first tasks; a biannual visit lists its own season's work, not the other's. */
  const pmNote = (plan: Plan, date: string) => {
    if (plan === 'biannual') {
      const spring = month(date) <= 6;
      const season = TASKS.biannual.find((x) => x.startsWith(spring ? 'Spring: ' : 'Autumn: '))!.replace(/^\w+: /, '');
      const rest = TASKS.biannual.filter((x) => !/^(Spring|Autumn): /.test(x));
      return `${spring ? 'Spring' : 'Autumn'} PM complete: ${[season, ...rest].join('; ').toLowerCase()}.`;
    }
    return `${plan === 'monthly' ? 'Monthly' : 'Quarterly'} PM complete: ${TASKS[plan].slice(0, 3).join('; ').toLowerCase()}.`;
  };
  const soonEndingPerBranch = new Map<string, number>();
  for (const b of branches) {
    for (const site of b.sites) {
      if (site.def.noAgreement) continue;
      const plan: Plan = isRefrigerationSite(site) ? 'monthly' : site.kind === 'school' ? 'biannual' : 'quarterly';
      const day = rng.int(3, 26);
      const length = rng.pick([12, 24]);
      const soon = (soonEndingPerBranch.get(b.id) ?? 0) < 2 && rng.chance(0.35);
      const endOffset = soon ? rng.int(10, 58) : rng.int(70, length * 30 - 30);
      if (soon) soonEndingPerBranch.set(b.id, (soonEndingPerBranch.get(b.id) ?? 0) + 1);
      let end = addDays(today, endOffset);
      let start = addDays(addMonths(end, -length), 1);
      const units = site.units.filter((u) => plan === 'monthly' || u.model.kind !== 'reach_in');
      const minutes = Math.min(420, Math.max(60, Math.round(units.reduce((s, u) => s + (PM_MINUTES[u.model.kind] ?? 60), 0) / 15) * 15));
      const perVisit = units.reduce((s, u) => s + (PM_PRICE[u.model.kind] ?? 15_000), 0);
      const visitsPerYear = plan === 'monthly' ? 12 : plan === 'quarterly' ? 4 : 2;
      const name = `${plan === 'monthly' ? 'Monthly refrigeration care' : plan === 'quarterly' ? 'Quarterly comfort maintenance' : 'Spring & autumn service'} — ${site.name}`;
      let current = true;
      for (;;) {
        const id = rng.uuid();
        const rrule =
          plan === 'monthly'
            ? `FREQ=MONTHLY;BYMONTHDAY=${day}`
            : plan === 'quarterly'
              ? `FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=${day}`
              : `FREQ=YEARLY;BYMONTH=4,10;BYMONTHDAY=${day}`;
        const years = (daysFrom(start, end) + 1) / 365;
        const at = wallTime(start, 9 * 60, b.tz);
        rows.agreements.push({
          id,
          branchId: b.id,
          siteId: site.id,
          name,
          rrule,
          seasonNotes:
            plan === 'biannual'
              ? 'Spring cooling start-up in April; autumn heating check in October.'
              : plan === 'quarterly'
                ? 'Filters every visit; belts in spring and autumn.'
                : 'Condenser coil wash every third visit.',
          termStart: start,
          termEnd: end,
          slaHours: plan === 'monthly' ? 4 : 24,
          priceCents: cents(Math.round((perVisit * visitsPerYear * years) / 100) * 100),
          visitMinutes: minutes,
          tasks: TASKS[plan],
          status: current ? 'active' : 'ended',
          createdAt: at,
          updatedAt: at,
        });
        for (const u of units) rows.agreementUnits.push({ agreementId: id, unitId: u.id });
        terms.push({ id, site, plan, day, start, end, minutes, name, units });
        if (current) {
          site.slaHours = plan === 'monthly' ? 4 : 24;
          site.currentAgreementId = id;
        }
        current = false;
        if (start <= historyStart) break;
        end = addDays(start, -1);
        start = addDays(addMonths(end, -12), 1);
      }
    }
  }
  function occurrences(term: Term): string[] {
    const out: string[] = [];
    const [sy, sm] = [year(term.start), month(term.start)];
    if (term.plan === 'biannual') {
      for (let y = sy; y <= year(term.end); y++) {
        for (const m of [4, 10]) {
          const d = `${y}-${String(m).padStart(2, '0')}-${String(term.day).padStart(2, '0')}`;
          if (d >= term.start && d <= term.end) out.push(d);
        }
      }
      return out;
    }
    const step = term.plan === 'monthly' ? 1 : 3;
    for (let k = 0; ; k += step) {
      const first = addMonths(`${sy}-${String(sm).padStart(2, '0')}-01`, k);
      const d = `${first.slice(0, 8)}${String(term.day).padStart(2, '0')}`;
      if (d > term.end) break;
      if (d >= term.start) out.push(d);
    }
    return out;
  }

  // The working week of the anchored stops: Mon–Fri containing today, or the coming one at a weekend.
  const wd = weekday(today);
  const weekDays: string[] = [];
  {
    const first = wd === 6 ? addDays(today, 2) : wd === 0 ? addDays(today, 1) : today;
    for (let d = first; weekday(d) >= 1 && weekday(d) <= 5; d = addDays(d, 1)) weekDays.push(d);
  }
  const weekFirst = weekDays[0]!;
  const weekLast = weekDays[weekDays.length - 1]!;

  // ───────────────────────── anchored stories ─────────────────────────
  const quiet = (u: Unit, from: string) => {
    if (!u.quietFrom || from < u.quietFrom) u.quietFrom = from;
  };
  const chicago = branches[0]!;
  const mesa = branches[1]!;
  const raleigh = branches[2]!;
  const techByEmail = (e: string) => branches.flatMap((b) => b.techs).find((x) => x.email === e)!;
  const defectUnits = (b: Branch) => b.units.filter((u) => u.model.model === DEFECT_MODEL);

  /** Booked work for this week, filled in per technician below; stories add to it first. */
  interface Stop {
    tech: Tech;
    date: string;
    wo: WoRow;
    first?: boolean;
    minutes: number;
  }
  const stops: Stop[] = [];

  // Factory-defect callbacks: a first visit closed `resolved`, then a callback that found the miswired harness.
  interface DefectStory {
    unit: Unit;
    firstDaysAgo: number;
    gap: number;
    claim: 'to_claim' | 'claimed' | 'paid';
    needsReturn?: boolean;
  }
  const [dc1, dc2, dc3, dc4] = [defectUnits(chicago)[0]!, defectUnits(chicago)[1]!, defectUnits(mesa)[0]!, defectUnits(raleigh)[0]!];
  const defectStories: DefectStory[] = [
    { unit: dc3, firstDaysAgo: 205, gap: 14, claim: 'paid' },
    { unit: dc1, firstDaysAgo: 82, gap: 12, claim: 'claimed' },
    { unit: dc4, firstDaysAgo: 64, gap: 8, claim: 'claimed' },
    { unit: dc2, firstDaysAgo: 50, gap: 9, claim: 'to_claim', needsReturn: true },
  ];
  for (const s of defectStories) {
    const u = s.unit;
    u.scriptedRefrigerant = true;
    quiet(u, addDays(today, -s.firstDaysAgo - 40));
    const first = closedCall({
      unit: u,
      date: addDays(today, -s.firstDaysAgo),
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 1,
      outcome: 'resolved',
      alarmCode: 'LP1',
      priority: 'high',
      requiredSkill: null,
      findingNotes:
        'LP1 in the alarm history; circuit 1 subcooling at the low end of its target and no leak found with the electronic detector. Added 1.5 lb, reset LP1 and ran 40 min without a trip.',
      visitNotes: 'LP1 reset; circuit 1 topped off. Unit running on both circuits at departure.',
      conditions: { 1: 'normal', 2: 'normal' },
      refrigerant: [{ unit: u, added: 1.5, reason: 'leak_top_off', scripted: true }],
    })!;
    const cb = closedCall({
      unit: u,
      date: addDays(first.slot.date, s.gap),
      kind: 'callback',
      originWorkOrderId: first.wo.id,
      cause: 'wiring_fault',
      circuit: 1,
      alarmCode: 'LP1',
      priority: 'high',
      outcome: s.needsReturn ? 'needs_return' : 'resolved',
      wantsReturn: ['manufacturer'],
      requiredSkill: 'controls',
      complaint: 'LP1 low-pressure alarm on circuit 1 again after last visit',
      minutes: rng.int(150, 210),
      finding: {
        unit: u,
        causeCode: 'wiring_fault',
        origin: 'factory_defect',
        alarmCode: 'LP1',
        reportedCircuit: 1,
        actualCircuit: 2,
        notes: DEFECT_FINDING_NOTES,
      },
      visitNotes: s.needsReturn
        ? 'Traced LP1 to circuit 2’s low-pressure switch wired to the circuit 1 input at the factory harness. Manufacturer asked for its own harness jumper; temporary re-land done.'
        : 'Traced LP1 to circuit 2’s low-pressure switch wired to the circuit 1 input at the factory harness; re-landed. Recovered the 1.5 lb added to circuit 1 last visit; subcooling back on target.',
      conditions: { 1: 'normal', 2: 'normal' },
      refrigerant: [{ unit: u, recovered: 1.5, reason: 'recovery', scripted: true }],
    })!;
    let labour = cb.visit.labourMinutes ?? 0;
    if (s.needsReturn) {
      const rv = closedCall({
        unit: u,
        date: addDays(cb.slot.date, rng.int(7, 10)),
        kind: 'return_visit',
        originWorkOrderId: cb.wo.id,
        cause: 'wiring_fault',
        outcome: 'resolved',
        returnNeeds: ['manufacturer'],
        alarmCode: null,
        requiredSkill: 'controls',
        finding: null,
        minutes: 120,
        visitNotes: 'Installed the manufacturer’s revised harness jumper per its field bulletin; verified LP1 and LP2 trip individually.',
        refrigerant: [],
      })!;
      labour += rv.visit.labourMinutes ?? 0;
    }
    const amount = Math.round((labour / 60) * u.branch.def.labourRateCents + 1.5 * u.branch.def.refrigerantPriceCentsPerLb);
    rows.warrantyClaims.push({
      id: rng.uuid(),
      workOrderId: cb.wo.id,
      status: s.claim,
      amountCents: amount,
      reference: s.claim === 'to_claim' ? null : `QM-WC-${rng.int(24000, 26999)}`,
      notes:
        s.claim === 'paid'
          ? 'Labour and refrigerant credited by the manufacturer.'
          : s.claim === 'claimed'
            ? 'Submitted with photos of the harness and the wiring diagram.'
            : 'Collect harness photos before submitting.',
      updatedById: owner.id,
      updatedAt: cb.slot.closedAt,
    });
  }

  // Repeat alarms on units of the defect model not yet checked, and an HP2 repeat on another rooftop unit.
  const unchecked = (b: Branch) => defectUnits(b).filter((u) => !defectStories.some((s) => s.unit === u));
  const uTech = unchecked(chicago)[0]!; // today's first stop for tech@coilpath.example
  const uMesa = unchecked(mesa)[0]!;
  const uRaleigh = unchecked(raleigh)[0]!;
  const hp2Unit = raleigh.units.find((u) => u.model.kind === 'rooftop_unit' && u.circuits.length === 2 && u.model.model !== DEFECT_MODEL)!;
  const repeat = (u: Unit, code: string, circuit: number, daysAgo: number[], lastOpen: boolean) => {
    quiet(u, addDays(today, -32));
    daysAgo.forEach((n, i) => {
      const raised = wallTime(addDays(today, -n), rng.int(11 * 60, 16 * 60), u.branch.tz);
      const open = lastOpen && i === daysAgo.length - 1;
      alarm(u, code, circuit, raised, open ? null : addMinutes(raised, rng.int(25, 95)));
    });
  };
  repeat(uTech, 'LP1', 1, [21, 9, 1], false);
  repeat(uMesa, 'LP1', 1, [26, 15, 4, 2], true);
  repeat(uRaleigh, 'LP1', 1, [18, 6], true);
  repeat(hp2Unit, 'HP2', 2, [24, 11, 3], true);

  // The unit on tech@'s first stop has history: an LP1 call ~75 days ago that found nothing.
  quiet(uTech, addDays(today, -110));
  closedCall({
    unit: uTech,
    date: addDays(today, -75),
    cause: 'no_fault_found',
    origin: 'external',
    circuit: 1,
    outcome: 'resolved',
    alarmCode: 'LP1',
    requiredSkill: null,
    conditions: { 1: 'normal', 2: 'normal' },
    refrigerant: [],
    findingNotes:
      'LP1 reset. Circuit 1 pressures normal on the reference gauges; could not reproduce at stage-up. Asked the site to call if it returns.',
  });

  // Leak case due within 7 days (Chicago): R-410A comfort-cooling chiller, 180 lb full charge.
  const leakChiller = chicago.units.find((u) => u.model.kind === 'chiller' && u.refrigerant === 'R-410A')!;
  leakChiller.scriptedRefrigerant = true;
  quiet(leakChiller, addDays(today, -110));
  const chillerTech = techByEmail('anneke.strand@coilpath.example');
  {
    const u = leakChiller;
    const triggerDate = prevWorkday(chicago, addDays(today, -24));
    const firstDate = prevWorkday(chicago, addDays(triggerDate, -41));
    const sc1 = closedCall({
      unit: u,
      date: firstDate,
      exact: true,
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 2,
      outcome: 'resolved',
      alarmCode: 'LP2',
      priority: 'high',
      requiredSkill: 'chiller',
      tech: chillerTech,
      minutes: 180,
      findingNotes:
        'Circuit 2 short of charge. No leak found at the accessible joints with the electronic detector; added 6 lb and asked for a leak search at the next PM.',
      refrigerant: [{ unit: u, added: 6, reason: 'leak_top_off', scripted: true }],
    })!;
    // The note quotes the superheat and subcooling of the visit's own circuit 2 reading, as the visit screen shows them.
    const figures = chargeFigures(sc1.visit.id, u.circuits[1]!.id);
    if (figures)
      findingOf(sc1.visit.id).notes =
        `Circuit 2 short of charge (${figures}). No leak found at the accessible joints with the electronic detector; added 6 lb and asked for a leak search at the next PM.`;
    // Annualizing (40 CFR 84.106 via 82.152): % = lb added ÷ full charge × 365 ÷ min(days since the previous addition, 365) × 100.
    // With the previous addition 41 days earlier in 2026: 9.5 ÷ 180 × 365 ÷ 41 × 100 = 46.98 % > 10 % (comfort cooling) → repair within
    // 30 days of the addition, i.e. about 6 days from today. (Both visits move to the previous working day when they fall on a
    // weekend, so the day count and rate shift slightly — e.g. 42 days gives 45.87 %; the stored rate is computed, not typed.) If the previous addition fell before 2026-01-01, the first Part 84
    // calculation uses 365 days (84.106(b)(1)), so the addition is sized to exceed the threshold either way.
    const cover = coveredBy(
      { refrigerant: u.refrigerant, fullChargeLb: u.fullChargeLb, applianceCategory: u.applianceCategory },
      triggerDate,
    )!;
    const days = cover ? annualizingDays(cover, sc1.slot.date, triggerDate) : 365;
    const lb = days < 365 ? 9.5 : 23.5;
    const triggerId = rng.uuid();
    const sc2 = closedCall({
      unit: u,
      date: triggerDate,
      exact: true,
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 2,
      outcome: 'needs_return',
      alarmCode: 'LP2',
      priority: 'high',
      requiredSkill: 'chiller',
      tech: chillerTech,
      minutes: 200,
      wantsReturn: ['leak_search'],
      findingNotes: `Circuit 2 low again ${daysFrom(sc1.slot.date, triggerDate)} days after the last top-off; added ${lb} lb. Leak rate over the comfort-cooling threshold: leak case opened.`,
      refrigerant: [{ unit: u, added: lb, reason: 'leak_top_off', scripted: true, id: triggerId }],
    })!;
    const rate = annualizedRate(lb, u.fullChargeLb, days);
    const rv1 = closedCall({
      unit: u,
      date: addDays(triggerDate, 7),
      kind: 'return_visit',
      originWorkOrderId: sc2.wo.id,
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 2,
      outcome: 'needs_return',
      returnNeeds: ['leak_search'],
      wantsReturn: ['parts', 'second_tech'],
      requiredSkill: 'chiller',
      tech: chillerTech,
      minutes: 210,
      alarmCode: null,
      conditions: { 2: 'low_charge' },
      findingNotes:
        'Leak search with the electronic detector, confirmed with bubble solution: cracked braze joint on the circuit 2 condenser coil header. Header section and a brazing crew needed.',
      visitNotes: 'Leak located on the circuit 2 condenser header; circuit 2 locked out, chiller running on circuit 1.',
      returnNotes: `Header section ordered. Two techs: recover circuit 2 (about ${Math.round(u.fullChargeLb / u.circuits.length)} lb), braze under nitrogen, pressure-test, evacuate to 500 microns and weigh the charge back in.`,
      refrigerant: [],
    })!;
    const caseId = rng.uuid();
    const due = addDays(triggerDate, 30);
    // The repair itself is not booked yet: the branch manager books it from the Watchlist (return visit, EPA 608
    // Type II, the due date as its booking deadline).
    rows.leakCases.push({
      id: caseId,
      branchId: chicago.id,
      unitId: u.id,
      triggeringEventId: triggerId,
      openedOn: triggerDate,
      rule: cover?.rule ?? '40 CFR 84.106',
      method: 'annualizing',
      thresholdPercent: cover?.thresholdPercent ?? 10,
      leakRatePercent: round2(rate),
      repairDueDate: due,
      status: 'open',
      repairWorkOrderId: null,
      notes: `Annualized leak rate ${round2(rate)} % (${lb} lb ÷ ${u.fullChargeLb} lb × 365 ÷ ${days} d) over the 10 % comfort-cooling threshold.`,
      createdAt: sc2.slot.closedAt,
      updatedAt: rv1.slot.closedAt,
    });
  }

  // Overdue leak case (Mesa): R-404A walk-in freezer at a grocery store, 28 lb, commercial refrigeration (20 %).
  const leakWalkIn = mesa.units.find((u) => u.site.def.special === 'leak-walk-in' && u.tag === 'WIF-1')!;
  leakWalkIn.scriptedRefrigerant = true;
  quiet(leakWalkIn, addDays(today, -100));
  const walkInTech = techByEmail('sabine.ortega@coilpath.example');
  {
    const u = leakWalkIn;
    const triggerDate = prevWorkday(mesa, addDays(today, -33));
    const firstDate = prevWorkday(mesa, addDays(triggerDate, -19));
    const sc1 = closedCall({
      unit: u,
      date: firstDate,
      exact: true,
      cause: 'refrigerant_leak',
      origin: 'wear',
      outcome: 'resolved',
      alarmCode: 'HI-TEMP',
      priority: 'emergency',
      tech: walkInTech,
      requiredSkill: 'refrigeration',
      minutes: 120,
      findingNotes: 'Box at 12 °F with frost pattern short on the evaporator; added 3.5 lb R-404A. Leak search quoted.',
      refrigerant: [{ unit: u, added: 3.5, reason: 'leak_top_off', scripted: true }],
    })!;
    // Annualizing: 4 ÷ 28 × 365 ÷ 19 × 100 = 274.4 % > 20 % (commercial refrigeration); repair due 30 days after the addition —
    // three days ago. (With no 2026 addition before it, 365 days are used and the addition is sized to exceed 20 % anyway.)
    const cover = coveredBy(
      { refrigerant: u.refrigerant, fullChargeLb: u.fullChargeLb, applianceCategory: u.applianceCategory },
      triggerDate,
    );
    const days = cover ? annualizingDays(cover, sc1.slot.date, triggerDate) : 365;
    const lb = days < 365 ? 4 : 7;
    const triggerId = rng.uuid();
    const sc2 = closedCall({
      unit: u,
      date: triggerDate,
      exact: true,
      cause: 'refrigerant_leak',
      origin: 'wear',
      outcome: 'needs_return',
      alarmCode: 'HI-TEMP',
      priority: 'emergency',
      tech: walkInTech,
      requiredSkill: 'refrigeration',
      minutes: 150,
      wantsReturn: ['parts'],
      findingNotes: `Short of charge again; added ${lb} lb. Leak found on the evaporator coil (pin-holes at the return bends); coil ordered.`,
      refrigerant: [{ unit: u, added: lb, reason: 'leak_top_off', scripted: true, id: triggerId }],
    })!;
    const rate = annualizedRate(lb, u.fullChargeLb, days);
    const caseId = rng.uuid();
    const due = addDays(triggerDate, 30);
    const repair = newWorkOrder({
      branch: mesa,
      site: u.site,
      unit: u,
      kind: 'return_visit',
      state: 'booked',
      createdAt: addMinutes(sc2.slot.closedAt, 45),
      priority: 'emergency',
      complaint: `Replace WIF-1 evaporator coil (leak case, repair was due ${due})`,
      estimatedMinutes: 240,
      originWorkOrderId: sc2.wo.id,
      requiredSkill: 'refrigeration',
      requiredCertification: 'II',
      returnNeeds: ['parts'],
      latestAt: wallTime(due, 17 * 60, mesa.tz),
      slaDueAt: null,
      leakCaseId: caseId,
    });
    // The deadline has passed, so booking the repair breaks the due-time rule: the dispatcher overrode it, saying why.
    bookedAgainst.set(repair.id, {
      rules: ['due_time'],
      reason: 'Coil on back-order from the manufacturer; booked for the day it arrives',
    });
    stops.push({ tech: walkInTech, date: weekFirst, wo: repair, minutes: 240, first: true });
    rows.leakCases.push({
      id: caseId,
      branchId: mesa.id,
      unitId: u.id,
      triggeringEventId: triggerId,
      openedOn: triggerDate,
      rule: cover?.rule ?? '40 CFR 84.106',
      method: 'annualizing',
      thresholdPercent: cover?.thresholdPercent ?? 20,
      leakRatePercent: round2(rate),
      repairDueDate: due,
      status: 'open',
      repairWorkOrderId: repair.id,
      notes: `Coil on back-order from the manufacturer; repair deadline passed on ${due}. Extension not requested.`,
      createdAt: sc2.slot.closedAt,
      updatedAt: sc2.slot.closedAt,
    });
  }

  // Repaired and closed leak case (Raleigh): legacy R-22 chiller, 85 lb, under 40 CFR 82.157 (ODS, 50 lb or more).
  const r22Chiller = raleigh.units.find((u) => u.model.kind === 'chiller' && u.refrigerant === 'R-22')!;
  r22Chiller.scriptedRefrigerant = true;
  quiet(r22Chiller, addDays(today, -330));
  {
    const u = r22Chiller;
    const tech = techByEmail('tech.raleigh@coilpath.example');
    const sc1 = closedCall({
      unit: u,
      date: addDays(today, -290),
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 1,
      outcome: 'resolved',
      alarmCode: 'LP1',
      tech,
      minutes: 180,
      requiredSkill: 'chiller',
      findingNotes: 'Circuit 1 low; added 6 lb reclaimed R-22. No leak found at the valves.',
      refrigerant: [{ unit: u, added: 6, reason: 'leak_top_off', scripted: true }],
    })!;
    const triggerId = rng.uuid();
    const sc2 = closedCall({
      unit: u,
      date: addDays(sc1.slot.date, 60),
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 1,
      outcome: 'needs_return',
      alarmCode: 'LP1',
      tech,
      minutes: 180,
      requiredSkill: 'chiller',
      wantsReturn: ['leak_search'],
      findingNotes: 'Circuit 1 low again; added 12 lb reclaimed R-22. Leak case opened.',
      refrigerant: [{ unit: u, added: 12, reason: 'leak_top_off', scripted: true, id: triggerId }],
    })!;
    // Annualizing (40 CFR 82.157): 12 ÷ 85 × 365 ÷ 60 × 100 = 85.88 % > 10 % → repaired within 30 days, verified twice.
    const days = daysFrom(sc1.slot.date, sc2.slot.date);
    const rate = annualizedRate(12, 85, days);
    const caseId = rng.uuid();
    const fix = closedCall({
      unit: u,
      date: addDays(sc2.slot.date, 14),
      kind: 'return_visit',
      originWorkOrderId: sc2.wo.id,
      cause: 'refrigerant_leak',
      origin: 'wear',
      circuit: 1,
      outcome: 'resolved',
      returnNeeds: ['leak_search'],
      tech,
      minutes: 300,
      requiredSkill: 'chiller',
      alarmCode: null,
      leakCaseId: caseId,
      findingNotes:
        'Leak at the circuit 1 liquid-line solenoid valve body. Pumped circuit 1 down into the condenser, replaced the valve, pressure-tested with nitrogen, evacuated to 500 microns and opened the circuit back up.',
      refrigerant: [],
    })!;
    rows.leakCases.push({
      id: caseId,
      branchId: raleigh.id,
      unitId: u.id,
      triggeringEventId: triggerId,
      openedOn: sc2.slot.date,
      rule: '40 CFR 82.157',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: round2(rate),
      repairDueDate: addDays(sc2.slot.date, 30),
      status: 'closed',
      repairWorkOrderId: fix.wo.id,
      repairedOn: fix.slot.date,
      closedAt: wallTime(addDays(fix.slot.date, 7), 16 * 60, raleigh.tz),
      notes: `Annualized ${round2(rate)} % (12 lb ÷ 85 lb × 365 ÷ ${days} d). Repaired and verified; replacement with a low-GWP chiller quoted.`,
      createdAt: sc2.slot.closedAt,
      updatedAt: wallTime(addDays(fix.slot.date, 7), 16 * 60, raleigh.tz),
    });
    rows.verificationTests.push(
      {
        id: rng.uuid(),
        leakCaseId: caseId,
        kind: 'initial',
        testedOn: fix.slot.date,
        passed: true,
        notes: 'Standing nitrogen test at 150 psig held 30 min.',
        byUserId: tech.id,
        createdAt: fix.slot.closedAt,
      },
      {
        id: rng.uuid(),
        leakCaseId: caseId,
        kind: 'follow_up',
        testedOn: addDays(fix.slot.date, 7),
        passed: true,
        notes: 'Running check with electronic detector: no leak found.',
        byUserId: tech.id,
        createdAt: wallTime(addDays(fix.slot.date, 7), 16 * 60, raleigh.tz),
      },
    );
  }

  // ───────────────────────── this week: booked stops and unplaced work ─────────────────────────
  const storyUnits = new Set<Unit>([leakChiller, leakWalkIn, r22Chiller]);
  const usedThisWeek = new Set<Unit>(storyUnits);
  // Today's first stop for tech@coilpath.example: the repeat-LP1 unit of the defect model.
  {
    const tech = techByEmail('tech@coilpath.example');
    const created = wallTime(addDays(weekFirst, -1), 16 * 60 + 20, chicago.tz);
    const wo = newWorkOrder({
      branch: chicago,
      site: uTech.site,
      unit: uTech,
      kind: 'service_call',
      state: 'booked',
      createdAt: created,
      priority: 'high',
      complaint: 'LP1 low-pressure alarm on circuit 1 — third trip in three weeks',
      estimatedMinutes: 120,
      requiredSkill: 'rooftop',
      requiredCertification: 'II',
    });
    stops.push({ tech, date: weekFirst, wo, minutes: 120, first: true });
    usedThisWeek.add(uTech);
  }

  // Planned visits falling in this week come from the agreements' recurrence rules.
  const pmPool = new Map<string, { term: Term; planned: string }[]>();
  for (const term of terms) {
    const b = term.site.branch;
    for (const occ of occurrences(term)) {
      const planned = nextWorkday(b, occ);
      if (planned >= weekFirst && planned <= weekLast && planned >= today) {
        const list = pmPool.get(b.id) ?? [];
        list.push({ term, planned });
        pmPool.set(b.id, list);
      }
    }
  }
  const pmWorkOrder = (b: Branch, p: { term: Term; planned: string }, state: WorkOrderState) =>
    newWorkOrder({
      branch: b,
      site: p.term.site,
      unit: p.term.units.length === 1 ? p.term.units[0]! : null,
      kind: 'planned_maintenance',
      state,
      createdAt: wallTime(addDays(p.planned, -21), 9 * 60, b.tz),
      complaint: `${p.term.name.split(' — ')[0]} visit`,
      estimatedMinutes: p.term.minutes,
      agreementId: p.term.id,
      plannedDate: p.planned,
      slaDueAt: null,
    });

  const unplacedOut: WoRow[] = [];
  // A unit has at most one open return visit (the database's rule, migration 0010): these have one this week.
  const openReturnUnits = new Set<Unit>(
    stops.filter((s) => s.wo.kind === 'return_visit' && s.wo.unitId).map((s) => unitById.get(s.wo.unitId!)!),
  );
  // Unplaced work per branch: return visits waiting to be booked (origin closed needs_return 2–8 days ago),
  // a callback, new calls due this week, and one or two planned visits.
  for (const b of branches) {
    const pool = rng.shuffle(b.units.filter((u) => hasCircuits(u) && !usedThisWeek.has(u) && !u.scriptedRefrigerant));
    const takeUnit = () => {
      const u = pool.shift()!;
      usedThisWeek.add(u);
      quiet(u, addDays(today, -45));
      return u;
    };
    const returnsToBook: [number, ReturnNeed[]][] = [
      [6, ['parts']],
      [rng.int(2, 4), rng.pick<ReturnNeed[]>([['leak_search'], ['parts', 'second_tech']])],
    ];
    for (const [daysAgo, needs] of returnsToBook) {
      const u = takeUnit();
      const origin = closedCall({
        unit: u,
        date: prevWorkday(b, addDays(today, -daysAgo)),
        exact: true,
        cause: needs.includes('leak_search') ? 'refrigerant_leak' : 'component_failure',
        outcome: 'needs_return',
        wantsReturn: [...needs],
      });
      if (!origin) continue;
      openReturnUnits.add(u);
      unplacedOut.push(
        newWorkOrder({
          branch: b,
          site: u.site,
          unit: u,
          kind: 'return_visit',
          state: 'unplaced',
          createdAt: addMinutes(origin.slot.closedAt, 20),
          priority: 'high',
          complaint: `Return visit: ${returnText([...needs])}`,
          estimatedMinutes: needs.includes('second_tech') ? 180 : 120,
          originWorkOrderId: origin.wo.id,
          requiredSkill: skillFor(u) ?? (needs.includes('leak_search') ? 'brazing' : null),
          requiredCertification: needs.includes('leak_search') ? 'II' : null,
          returnNeeds: [...needs],
          latestAt: wallTime(addDays(origin.slot.date, 14), 17 * 60, b.tz),
          slaDueAt: wallTime(weekLast, 17 * 60, b.tz),
        }),
      );
    }
    {
      const u = takeUnit();
      const cause = rng.weighted(causesFor(u));
      const origin = closedCall({
        unit: u,
        date: prevWorkday(b, addDays(today, -rng.int(6, 14))),
        exact: true,
        cause,
        outcome: 'resolved',
      });
      if (origin) {
        unplacedOut.push(
          newWorkOrder({
            branch: b,
            site: u.site,
            unit: u,
            kind: 'callback',
            state: 'unplaced',
            createdAt: wallTime(addDays(today, -1), 15 * 60, b.tz),
            priority: 'high',
            complaint: callbackComplaint(u, origin.wo.complaint),
            estimatedMinutes: 90,
            originWorkOrderId: origin.wo.id,
            requiredSkill: skillFor(u),
            slaDueAt: wallTime(weekLast, 12 * 60, b.tz),
          }),
        );
      }
    }
    const newCalls = rng.int(3, 4);
    for (let i = 0; i < newCalls; i++) {
      const u = i === 0 && b === mesa ? uMesa : takeUnit();
      usedThisWeek.add(u);
      const priority = i === 0 ? 'high' : rng.pick<Priority>(['emergency', 'high', 'normal', 'normal', 'low']);
      const created = wallTime(addDays(today, -rng.int(0, 1)), rng.int(7 * 60, 11 * 60), b.tz);
      const complaint =
        u === uMesa
          ? 'LP1 low-pressure alarm on circuit 1 — four trips this month'
          : complaintFor(u, rng.chance(0.5) ? alarmFor(u, 'component_failure', 1) : null);
      unplacedOut.push(
        newWorkOrder({
          branch: b,
          site: u.site,
          unit: u,
          kind: 'service_call',
          state: 'unplaced',
          createdAt: created,
          priority,
          complaint,
          estimatedMinutes: rng.pick([60, 90, 120, 150]),
          requiredSkill: u === uMesa ? 'rooftop' : skillFor(u),
          requiredCertification: u === uMesa || rng.chance(0.4) ? 'II' : null,
          slaDueAt: wallTime(weekDays[Math.min(weekDays.length - 1, rng.int(0, 2))]!, rng.int(12, 17) * 60, b.tz),
        }),
      );
    }
    const list = pmPool.get(b.id) ?? [];
    for (const p of list.splice(0, Math.min(list.length, rng.int(1, 2)))) unplacedOut.push(pmWorkOrder(b, p, 'unplaced'));
  }

  // Booked stops: 2–4 per technician per working day, non-overlapping, inside working hours.
  for (const b of branches) {
    const pms = pmPool.get(b.id) ?? [];
    const pool = rng.shuffle(b.units.filter((u) => !storyUnits.has(u)));
    const takeUnit = (tech: Tech) => {
      const skillOk = (u: Unit) => !skillFor(u) || tech.skills.includes(skillFor(u)!);
      const fits = (u: Unit) =>
        !usedThisWeek.has(u) && skillOk(u) && (tech.cert !== 'I' || isSmall(u) || !hasCircuits(u) || u.model.kind === 'rooftop_unit');
      const u = pool.find(fits) ?? rng.pick(b.units.filter((x) => !storyUnits.has(x) && skillOk(x)));
      usedThisWeek.add(u);
      return u;
    };
    for (const day of weekDays) {
      for (const tech of b.techs) {
        const h = hoursOn(tech, day);
        if (!h) continue;
        const fixed = stops.filter((s) => s.tech === tech && s.date === day);
        const target = Math.max(
          fixed.length,
          rng.weighted([
            [2, 40],
            [3, 45],
            [4, 15],
          ]),
        );
        let cursor = h.start + rng.int(1, 3) * 15;
        let count = 0;
        const bookOne = (wo: WoRow, minutes: number) => {
          const startAt = wallTime(day, cursor, b.tz);
          const endAt = wallTime(day, cursor + minutes, b.tz);
          const wanted = wallTime(addDays(day, -rng.int(1, 4)), rng.int(9 * 60, 16 * 60), b.tz);
          const bookedAt = new Date(
            Math.max(wo.createdAt.getTime() + 20 * 60_000, Math.min(wanted.getTime(), startAt.getTime() - 90 * 60_000)),
          );
          const visit = book(wo, tech, startAt, endAt, bookedAt);
          rows.visitEvents.push({ id: rng.uuid(), visitId: visit.id, state: 'booked', at: bookedAt, byUserId: b.dispatcherId });
          wo.state = 'booked';
          wo.updatedAt = bookedAt;
          cursor += minutes + rng.int(2, 3) * 15;
          count++;
        };
        for (const s of fixed) bookOne(s.wo, s.minutes);
        while (count < target) {
          const pmIdx = pms.findIndex((p) => p.planned === day);
          if (pmIdx >= 0 && rng.chance(0.8)) {
            const minutes = Math.min(pms[pmIdx]!.term.minutes, 300);
            if (cursor + minutes > h.end) break;
            const p = pms.splice(pmIdx, 1)[0]!;
            bookOne(pmWorkOrder(b, p, 'booked'), minutes);
            continue;
          }
          const u = takeUnit(tech);
          const minutes = u.model.kind === 'chiller' ? 180 : rng.pick([60, 90, 90, 120]);
          if (cursor + minutes > h.end) break;
          const drawn = rng.weighted<WorkOrderKind>([
            ['service_call', 80],
            ['callback', 8],
            ['return_visit', 12],
          ]);
          // A second return visit for a unit that already has one open this week would be the same truck roll.
          const kind: WorkOrderKind = drawn === 'return_visit' && openReturnUnits.has(u) ? 'service_call' : drawn;
          let created = wallTime(addDays(day, -rng.int(1, 3)), rng.int(8 * 60, 16 * 60), b.tz);
          let origin: CallResult | null = null;
          if (kind !== 'service_call') {
            quiet(u, addDays(today, -45));
            const cause = rng.weighted(causesFor(u));
            origin = closedCall({
              unit: u,
              date: prevWorkday(b, addDays(today, kind === 'callback' ? -rng.int(5, 18) : -rng.int(3, 9))),
              exact: true,
              cause,
              outcome: kind === 'callback' ? 'resolved' : 'needs_return',
              wantsReturn: ['parts'],
            });
            if (origin && origin.slot.closedAt > created) created = addMinutes(origin.slot.closedAt, 60);
          } else {
            quiet(u, addDays(today, -21));
          }
          const realKind: WorkOrderKind = origin ? kind : 'service_call';
          if (realKind === 'return_visit') openReturnUnits.add(u);
          bookOne(
            newWorkOrder({
              branch: b,
              site: u.site,
              unit: u,
              kind: realKind,
              state: 'booked',
              createdAt: created,
              priority:
                realKind === 'callback'
                  ? 'high'
                  : rng.weighted<Priority>([
                      ['normal', 60],
                      ['high', 25],
                      ['low', 15],
                    ]),
              complaint:
                realKind === 'return_visit'
                  ? 'Return visit: parts'
                  : realKind === 'callback'
                    ? callbackComplaint(u, origin!.wo.complaint)
                    : complaintFor(u, rng.chance(0.4) ? alarmFor(u, rng.weighted(causesFor(u)), 1) : null),
              estimatedMinutes: minutes,
              originWorkOrderId: origin?.wo.id ?? null,
              returnNeeds: realKind === 'return_visit' ? ['parts'] : [],
              requiredSkill: rng.chance(0.4) ? skillFor(u) : null,
              requiredCertification: tech.cert !== 'I' && hasCircuits(u) && !isSmall(u) && rng.chance(0.3) ? 'II' : null,
            }),
            minutes,
          );
        }
      }
    }
    // Planned visits this week that did not fit stay unplaced.
    for (const p of pms) unplacedOut.push(pmWorkOrder(b, p, 'unplaced'));
  }

  // ───────────────────────── two years of history ─────────────────────────
  // Planned maintenance from the agreements: mostly on time, a few late, a couple missed.
  const missedPerBranch = new Map<string, number>();
  for (const term of terms) {
    const b = term.site.branch;
    for (const occ of occurrences(term)) {
      const planned = nextWorkday(b, occ);
      if (planned >= today || planned < historyStart) continue;
      const daysAgo = daysFrom(planned, today);
      const missed = missedPerBranch.get(b.id) ?? 0;
      if (daysAgo > 20 && daysAgo < 200 && missed < 2 && rng.chance(0.12)) {
        missedPerBranch.set(b.id, missed + 1);
        const wo = pmWorkOrder(b, { term, planned }, missed === 0 ? 'cancelled' : 'unplaced');
        if (wo.state === 'cancelled') {
          wo.updatedAt = wallTime(addDays(planned, 3), 10 * 60, b.tz);
          wo.complaint += ' (site closed for renovation; visit skipped)';
        }
        continue;
      }
      const r = rng.next();
      const date = r < 0.08 ? addDays(planned, rng.int(8, 20)) : r < 0.2 ? addDays(planned, rng.int(1, 2)) : planned;
      const slot = date < today ? place(b, date, term.minutes, {}) : null;
      if (!slot || slot.date >= today) {
        const wo = pmWorkOrder(b, { term, planned }, 'cancelled');
        wo.updatedAt = wallTime(addDays(planned, 7), 10 * 60, b.tz);
        continue;
      }
      const wo = pmWorkOrder(b, { term, planned }, 'booked');
      const f = rng.chance(0.1) && term.units.length > 0 ? rng.pick(term.units) : null;
      runVisit(wo, slot, {
        outcome: 'resolved',
        notes: pmNote(term.plan, slot.date),
        findings: f ? [{ unit: f, causeCode: 'airflow', origin: 'wear', notes: rng.pick(pmFindingChoices(words(f))) }] : [],
        readings: { units: term.units },
      });
    }
  }

  // Service calls: about one per unit every three to six months, with return visits and callbacks.
  for (const b of branches) {
    for (const u of b.units) {
      const [lo, hi] = u.model.kind === 'boiler' || isSmall(u) ? [160, 320] : [90, 180];
      const earliest = addDays(u.installDate, 30) > historyStart ? addDays(u.installDate, 30) : historyStart;
      const horizon = u.quietFrom ?? today;
      let d = addDays(earliest, rng.int(0, 110));
      while (d < addDays(horizon, -2)) {
        const cause = rng.weighted(causesFor(u));
        const recent = daysFrom(d, horizon) < 14;
        const call = closedCall({
          unit: u,
          date: d,
          cause,
          outcome: recent ? rng.pick<VisitOutcome>(['resolved', 'resolved', 'declined']) : undefined,
        });
        if (call) followUps(call, cause, horizon);
        d = addDays(d, rng.int(lo, hi));
      }
    }
  }

  // ───────────────────────── this week before today: worked days ─────────────────────────
  // The history above leaves about one closed call per branch per day, so the workdays of this week before today
  // (Monday to yesterday; all of Mon–Fri at a weekend) get the load of the coming ones: 2–4 jobs per technician,
  // as closed service calls. A generator of their own keeps every draw above as it was. No alarms, refrigerant,
  // callbacks or return visits, and no unit that a story or this week's booked or unplaced work uses.
  {
    const main = rng;
    rng = new Rng(SEED ^ 0x3ee4da75);
    try {
      const monday = addDays(today, -((weekday(today) + 6) % 7));
      const pastDays: string[] = [];
      for (let d = monday; d < today && weekday(d) >= 1 && weekday(d) <= 5; d = addDays(d, 1)) pastDays.push(d);
      const tzOf = new Map(branches.map((b) => [b.id, b.tz]));
      const jobs = new Map<string, number>();
      const lastVisit = new Map<string, string>();
      const unitOf = new Map(rows.workOrders.map((w) => [w.id, w.unitId]));
      for (const bk of rows.bookings) {
        const key = `${bk.techId}|${localDate(bk.startAt, tzOf.get(bk.branchId)!)}`;
        jobs.set(key, (jobs.get(key) ?? 0) + 1);
        const unitId = unitOf.get(bk.workOrderId);
        const day = localDate(bk.startAt, tzOf.get(bk.branchId)!);
        if (unitId && day < today && (lastVisit.get(unitId) ?? '') < day) lastVisit.set(unitId, day);
      }
      // Units a story owns: the anchored stories, repeat alarms, the factory-defect model, and every unit with
      // unplaced work, a booked callback or return visit, or a leak case.
      const storyOwned = new Set<string>([...storyUnits, uTech, uMesa, uRaleigh, hp2Unit].map((u) => u.id));
      for (const b of branches) for (const u of b.units) if (u.scriptedRefrigerant || u.model.model === DEFECT_MODEL) storyOwned.add(u.id);
      for (const w of rows.workOrders) {
        if (w.unitId && (w.state === 'unplaced' || (w.state === 'booked' && w.kind !== 'service_call') || w.leakCaseId))
          storyOwned.add(w.unitId);
      }
      for (const b of branches) {
        const days = pastDays.filter((d) => isWorkday(b, d));
        if (days.length === 0) continue;
        const eligible = b.units.filter((u) => !storyOwned.has(u.id));
        // Units free this week and without a visit in the last three weeks first; units with a plain booked
        // service call later this week only once those run out (a branch this busy has few units left over).
        const rank = (u: Unit) => (usedThisWeek.has(u) ? 2 : 0) + (daysFrom(lastVisit.get(u.id) ?? historyStart, today) > 21 ? 0 : 1);
        const ranked = (list: Unit[]) => rng.shuffle(list).sort((x, y) => rank(x) - rank(y));
        const pool = ranked(eligible);
        for (const day of days) {
          const today_ = new Set<Unit>();
          for (const tech of b.techs) {
            if (!hoursOn(tech, day)) continue;
            const target = rng.weighted([
              [2, 40],
              [3, 45],
              [4, 15],
            ]);
            let count = jobs.get(`${tech.id}|${day}`) ?? 0;
            while (count < target) {
              const causesOk = (u: Unit) =>
                causesFor(u).filter(([c]) => c !== 'refrigerant_leak' && certOk(tech.cert, needsRefrigerantWork(u, c) ? 'II' : null));
              const fits = (u: Unit) => !today_.has(u) && (!skillFor(u) || tech.skills.includes(skillFor(u)!)) && causesOk(u).length > 0;
              // Each unit once while the pool lasts; then again, never twice on one day.
              let i = pool.findIndex(fits);
              if (i < 0) {
                pool.push(...ranked(eligible.filter((u) => !pool.includes(u))));
                i = pool.findIndex(fits);
              }
              if (i < 0) break;
              const u = pool.splice(i, 1)[0]!;
              const call = closedCall({
                unit: u,
                date: day,
                exact: true,
                tech,
                cause: rng.weighted(causesOk(u)),
                alarmCode: null,
                refrigerant: [],
                outcome: rng.chance(0.93) ? 'resolved' : 'declined',
              });
              if (!call) {
                pool.push(u);
                break;
              }
              today_.add(u);
              count++;
            }
          }
        }
      }
    } finally {
      rng = main;
    }
  }

  // ───────────────────────── refrigerant log, checked against the leak rules ─────────────────────────
  pendingRefrigerant.sort((a, b) => (a.row.date < b.row.date ? -1 : a.row.date > b.row.date ? 1 : 0));
  const lastAddition = new Map<string, string>();
  for (const p of pendingRefrigerant) {
    const u = p.spec.unit;
    const r = p.row;
    if ((r.poundsAdded ?? 0) > 0) {
      const cover = coveredBy({ refrigerant: u.refrigerant, fullChargeLb: u.fullChargeLb, applianceCategory: u.applianceCategory }, r.date);
      if (cover && !p.spec.scripted) {
        // Random top-offs stay under 90 % of the threshold, so the only leak cases are the scripted ones.
        const days = annualizingDays(cover, lastAddition.get(u.id) ?? null, r.date);
        const max = Math.floor(((0.9 * cover.thresholdPercent) / 100) * u.fullChargeLb * (days / 365) * 10) / 10;
        if (max < 0.3) continue;
        r.poundsAdded = Math.min(r.poundsAdded ?? 0, max);
      }
      lastAddition.set(u.id, r.date);
    }
    rows.refrigerantEvents.push(r);
  }

  // ───────────────────────── a second dispatcher in the first branch ─────────────────────────
  // Added last, with a generator of its own, so every draw above stays as it was.
  {
    const main = rng;
    rng = new Rng(SEED ^ 0x5d1a7c03);
    try {
      const b = branches[0]!;
      rows.users.push({
        id: rng.uuid(),
        email: SECOND_DISPATCHER.email,
        name: SECOND_DISPATCHER.name,
        role: 'dispatcher',
        branchId: b.id,
        passwordHash,
        phone: phone(b.def.areaCode),
        skills: [],
        epa608Type: 'none',
        epa608Number: null,
        workingHours: null,
        startAddress: null,
        startLat: null,
        startLon: null,
        colorIndex: 0,
        calendarToken: token(),
        createdAt: setupAt,
      });
    } finally {
      rng = main;
    }
  }

  (rows.workOrders as WoRow[]).sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime() || (a.id < b.id ? -1 : 1));
  return rows;
}

const round2 = (x: number) => Math.round(x * 100) / 100;
const round5 = (x: number) => Math.round(x * 100000) / 100000;
