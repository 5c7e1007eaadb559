/**
 * The large benchmark scenario: one invented contractor at scale (10 branches, 150 technicians, 3,000 sites,
 * 9,000 units, three years of closed work). Deterministic: every id and value comes from a seeded generator
 * and the history ends on a fixed day (BENCH_END), so two loads are identical and the benchmark asks the
 * same questions every time.
 *
 * Rows are produced branch by branch (`branchRows`) so the loader can insert one branch while the next is built.
 */
import { TZDate } from '@date-fns/tz';
import type { WorkingHours } from '@coilpath/contract';
import { MODELS, STREETS, type ModelDef } from '../../apps/api/src/db/seed/catalogue';
import { Rng } from '../../apps/api/src/db/seed/random';

/** The last day of the history (a Friday). The benchmark's year and roster week end here. */
export const BENCH_END = '2026-11-27';
export const BENCH_DAYS = 3 * 365;
export const BENCH_PASSWORD = 'coilpath-bench';
export const BENCH_OWNER = 'owner@bench.coilpath.example';
export const benchManager = (b: number) => `manager${b + 1}@bench.coilpath.example`;

export const BRANCH_COUNT = 10;
export const TECHS_PER_BRANCH = 15;
export const SITES_PER_BRANCH = 300;
export const UNITS_PER_SITE = 3;
/** Work orders per branch per working day (fresh service calls and maintenance; follow-ups come on top). */
const FRESH_PER_DAY = 28;

const DAY_MS = 86_400_000;
const ZONES = ['America/Chicago', 'America/Phoenix', 'America/Denver', 'America/New_York', 'America/Los_Angeles'];
const CITIES = [
  { city: 'Harrowfield', lat: 41.85, lon: -87.68 },
  { city: 'Mesa Verde Flats', lat: 33.42, lon: -111.83 },
  { city: 'Kestrel Springs', lat: 39.74, lon: -104.99 },
  { city: 'Brassport', lat: 40.71, lon: -74.0 },
  { city: 'Tollmarsh', lat: 34.05, lon: -118.24 },
  { city: 'Quarry Bend', lat: 32.78, lon: -96.8 },
  { city: 'Larchmont Hollow', lat: 47.61, lon: -122.33 },
  { city: 'Copperleaf', lat: 36.17, lon: -86.78 },
  { city: 'Wrenfield', lat: 39.1, lon: -84.51 },
  { city: 'Saltbrush', lat: 29.76, lon: -95.37 },
];
const MODEL_LIST: ModelDef[] = Object.values(MODELS);
const CAUSES = [
  ['refrigerant_leak', 14],
  ['sensor_fault', 12],
  ['wiring_fault', 10],
  ['control_fault', 12],
  ['component_failure', 22],
  ['airflow', 12],
  ['settings', 8],
  ['no_fault_found', 10],
] as const;
const ORIGINS = [
  ['wear', 55],
  ['installation', 10],
  ['prior_service', 8],
  ['external', 15],
  ['factory_defect', 12],
] as const;
const ALARM_CODES = ['HP1', 'LP1', 'LP2', 'CMP-OL', 'FAN-F', 'SAT-HI', 'DISCH-T', 'COMM'];

/** A row keyed by its database column names (snake_case), as the loader inserts it. */
export type DbRow = Record<string, unknown>;
export type TableRows = Map<string, DbRow[]>;

export function dayString(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

/** Calendar days of the history, first to last. */
export function historyDays(): string[] {
  const end = Date.parse(`${BENCH_END}T00:00:00Z`);
  const out: string[] = [];
  for (let i = BENCH_DAYS - 1; i >= 0; i--) out.push(dayString(end - i * DAY_MS));
  return out;
}

/** The rows every branch shares: the owner. */
export function globalRows(passwordHash: string): TableRows {
  const rng = new Rng(1);
  return new Map([
    [
      'users',
      [
        {
          id: rng.uuid(),
          email: BENCH_OWNER,
          name: 'Bench Owner',
          role: 'owner',
          branch_id: null,
          password_hash: passwordHash,
          skills: [],
          epa608_type: 'none',
          working_hours: null,
          color_index: 0,
          created_at: '2023-01-02T12:00:00Z',
        },
      ],
    ],
  ]);
}

/** Rows of branch `b` (0-based) in foreign-key order. */
export function branchRows(b: number, passwordHash: string): TableRows {
  const rng = new Rng(1000 + b * 7919);
  const zone = ZONES[b % ZONES.length]!;
  const place = CITIES[b]!;
  const branchId = rng.uuid();
  const code = `B${String(b + 1).padStart(2, '0')}`;
  const t = (name: string) => {
    const list: DbRow[] = [];
    tables.set(name, list);
    return list;
  };
  const tables: TableRows = new Map();
  const branches = t('branches');
  const users = t('users');
  const customers = t('customers');
  const sites = t('sites');
  const units = t('units');
  const circuits = t('circuits');
  const workOrders = t('work_orders');
  const bookings = t('bookings');
  const visits = t('visits');
  const readings = t('readings');
  const findings = t('findings');
  const refrigerantEvents = t('refrigerant_events');
  const alarms = t('alarms');

  branches.push({
    id: branchId,
    name: `${place.city} branch`,
    code,
    time_zone: zone,
    base_address: `1 ${STREETS[b]}, ${place.city}`,
    base_lat: place.lat,
    base_lon: place.lon,
    holidays: [],
    labour_rate_cents: 11_000 + b * 200,
    refrigerant_price_cents_per_lb: 8_500,
    currency: 'USD',
    unit_system: 'imperial',
    sensor_tolerance_percent: 3,
    sensor_tolerance_absolute: 5,
    repeat_alarm_count: 2,
    repeat_alarm_days: 30,
    callback_window_days: b % 3 === 0 ? 45 : 30,
    digest_hour: 7,
    created_at: '2023-01-02T12:00:00Z',
  });
  const person = (role: string, email: string, name: string, hours: WorkingHours | null, color: number) => {
    const id = rng.uuid();
    users.push({
      id,
      email,
      name,
      role,
      branch_id: branchId,
      password_hash: passwordHash,
      skills: role === 'technician' ? ['rooftop', 'controls'] : [],
      epa608_type: role === 'technician' ? 'universal' : 'none',
      working_hours: hours,
      start_address: hours ? `1 ${STREETS[b]}` : null,
      start_lat: hours ? place.lat : null,
      start_lon: hours ? place.lon : null,
      color_index: color,
      created_at: '2023-01-02T12:00:00Z',
    });
    return id;
  };
  person('branch_manager', benchManager(b), `Manager ${code}`, null, 0);
  person('dispatcher', `dispatch${b + 1}@bench.coilpath.example`, `Dispatcher ${code}`, null, 0);
  const day = { start: '07:00', end: '15:30' };
  const hours: WorkingHours = { sun: null, mon: day, tue: day, wed: day, thu: day, fri: day, sat: null };
  const techs: string[] = [];
  for (let i = 0; i < TECHS_PER_BRANCH; i++)
    techs.push(person('technician', `tech${b + 1}-${i + 1}@bench.coilpath.example`, `Technician ${code}-${i + 1}`, hours, i));

  interface U {
    id: string;
    siteId: string;
    circuits: string[];
    model: ModelDef;
  }
  const unitList: U[] = [];
  const siteIds: string[] = [];
  for (let c = 0; c < SITES_PER_BRANCH / 3; c++) {
    const customerId = rng.uuid();
    customers.push({ id: customerId, branch_id: branchId, name: `Customer ${code}-${c + 1}`, created_at: '2023-01-02T12:00:00Z' });
    for (let s = 0; s < 3; s++) {
      const siteId = rng.uuid();
      siteIds.push(siteId);
      sites.push({
        id: siteId,
        branch_id: branchId,
        customer_id: customerId,
        name: `Site ${code}-${c * 3 + s + 1}`,
        address: `${rng.int(100, 9899)} ${rng.pick(STREETS)}`,
        city: place.city,
        lat: place.lat + rng.range(-0.2, 0.2),
        lon: place.lon + rng.range(-0.25, 0.25),
        created_at: '2023-01-02T12:00:00Z',
      });
      for (let k = 0; k < UNITS_PER_SITE; k++) {
        const model = rng.pick(MODEL_LIST);
        const unitId = rng.uuid();
        const circuitIds: string[] = [];
        units.push({
          id: unitId,
          branch_id: branchId,
          site_id: siteId,
          tag: `U-${k + 1}`,
          kind: model.kind,
          make: model.make,
          model: model.model,
          serial: `${model.serialPrefix}-${code}-${rng.hex(8)}`,
          install_date: `${rng.int(model.installYears[0], model.installYears[1])}-0${rng.int(1, 9)}-15`,
          refrigerant: model.refrigerant,
          full_charge_lb: rng.range(model.charge[0], model.charge[1] + 0.01),
          appliance_category: model.category,
          tonnage: model.tonnage,
          created_at: '2023-01-02T12:00:00Z',
        });
        for (let n = 1; n <= Math.max(1, model.circuits); n++) {
          const circuitId = rng.uuid();
          circuitIds.push(circuitId);
          circuits.push({ id: circuitId, unit_id: unitId, number: n, compressor_count: model.compressorsPerCircuit, charge_lb: null });
        }
        unitList.push({ id: unitId, siteId, circuits: circuitIds, model });
      }
    }
  }

  // Work: per working day, fresh service calls and maintenance, plus follow-ups scheduled by earlier visits.
  interface Job {
    id: string;
    unit: U;
    kind: string;
    origin: string | null;
    createdMs: number;
    secondVisit: boolean;
    outcome?: string;
  }
  const queued = new Map<number, Job[]>(); // day index → follow-ups and second visits due
  const days = historyDays();
  const localStart = (d: string) => new TZDate(`${d}T07:00:00`, zone).getTime();
  const pushQueue = (i: number, j: Job) => {
    const list = queued.get(i);
    if (list) list.push(j);
    else queued.set(i, [j]);
  };
  for (let di = 0; di < days.length; di++) {
    const d = days[di]!;
    const wd = new Date(`${d}T00:00:00Z`).getUTCDay();
    if (wd === 0 || wd === 6) {
      // Weekend follow-ups move to Monday.
      const q = queued.get(di);
      if (q) for (const j of q) pushQueue(di + (wd === 6 ? 2 : 1), j);
      continue;
    }
    const dayStart = localStart(d);
    const jobs: Job[] = [];
    const fresh = rng.int(FRESH_PER_DAY - 5, FRESH_PER_DAY + 5);
    for (let n = 0; n < fresh; n++) {
      const unit = rng.pick(unitList);
      const kind = rng.chance(0.62) ? 'service_call' : 'planned_maintenance';
      const secondVisit = kind === 'planned_maintenance' && rng.chance(0.6);
      jobs.push({ id: rng.uuid(), unit, kind, origin: null, createdMs: dayStart - rng.int(60, 60 * 30) * 60_000, secondVisit });
    }
    const due = queued.get(di) ?? [];
    queued.delete(di);
    // Fresh and follow-up jobs are new work orders; second visits of earlier jobs are not.
    for (const j of jobs) {
      workOrders.push(workOrderRow(j, branchId));
    }
    for (const j of due) if (j.kind !== 'second') workOrders.push(workOrderRow(j, branchId));
    const todays = [...jobs, ...due];
    // Spread the day's visits over the technicians, one after another from 07:00 local.
    const cursor = techs.map(() => dayStart + rng.int(0, 30) * 60_000);
    for (let n = 0; n < todays.length; n++) {
      const job = todays[n]!;
      const ti = n % techs.length;
      const techId = techs[ti]!;
      const travel = rng.int(15, 40) * 60_000;
      const onSite = cursor[ti]! + travel;
      const minutes = rng.int(45, 150);
      const closed = onSite + minutes * 60_000;
      cursor[ti] = closed;
      const woId = job.kind === 'second' ? job.origin! : job.id;
      const bookingId = rng.uuid();
      const visitId = rng.uuid();
      bookings.push({
        id: bookingId,
        branch_id: branchId,
        work_order_id: woId,
        tech_id: techId,
        start_at: iso(onSite - travel),
        end_at: iso(closed),
        version: 1,
        created_at: iso(Math.min(job.createdMs + 3_600_000, onSite - travel)),
      });
      let outcome = 'resolved';
      if (job.kind === 'service_call') {
        outcome = rng.weighted([
          ['resolved', 78],
          ['needs_return', 17],
          ['declined', 5],
        ] as const);
        job.outcome = outcome;
      } else if (job.kind === 'planned_maintenance' && job.secondVisit) outcome = 'needs_return';
      visits.push({
        id: visitId,
        branch_id: branchId,
        work_order_id: woId,
        unit_id: job.unit.id,
        booking_id: bookingId,
        tech_id: techId,
        en_route_at: iso(onSite - travel),
        on_site_at: iso(onSite),
        closed_at: iso(closed),
        outcome,
        return_needs: outcome === 'needs_return' ? ['parts'] : [],
        labour_minutes: minutes,
        notes: null,
        created_at: iso(onSite - travel),
        updated_at: iso(closed),
      });
      if (job.kind === 'service_call' || job.kind === 'callback') {
        const cause = rng.weighted(CAUSES);
        const origin = job.unit.model.make === 'Quellmark' && rng.chance(0.5) ? 'factory_defect' : rng.weighted(ORIGINS);
        findings.push({
          id: rng.uuid(),
          visit_id: visitId,
          unit_id: job.unit.id,
          cause_code: cause,
          origin,
          notes: null,
          created_at: iso(closed - 60_000),
        });
        if (job.unit.model.refrigerant && (cause === 'refrigerant_leak' || rng.chance(0.2))) {
          refrigerantEvents.push({
            id: rng.uuid(),
            unit_id: job.unit.id,
            visit_id: visitId,
            date: d,
            refrigerant: job.unit.model.refrigerant,
            pounds_added: Math.round(rng.range(0.5, 6) * 10) / 10,
            pounds_recovered: 0,
            reason: 'leak_top_off',
            tech_id: techId,
            created_at: iso(closed),
          });
        }
      }
      // Readings: about three per visit over the unit's circuits (none on equipment without refrigerant).
      const count = job.unit.model.refrigerant ? rng.int(2, 5) : 0;
      for (let r = 0; r < count; r++) {
        const circuitId = job.unit.circuits[r % job.unit.circuits.length]!;
        const sp = rng.range(95, 145);
        const lp = rng.range(280, 420);
        readings.push({
          id: rng.uuid(),
          visit_id: visitId,
          unit_id: job.unit.id,
          circuit_id: circuitId,
          taken_at: iso(onSite + (r + 1) * 5 * 60_000),
          refrigerant: job.unit.model.refrigerant,
          suction_pressure: round1(sp),
          liquid_pressure: round1(lp),
          discharge_pressure: round1(lp + rng.range(5, 25)),
          suction_line_temp: round1(rng.range(45, 65)),
          liquid_line_temp: round1(rng.range(85, 105)),
          outdoor_temp: round1(rng.range(40, 100)),
          suction_pressure_controller: round1(sp + rng.range(-4, 4)),
          liquid_pressure_controller: round1(lp + rng.range(-8, 8)),
          created_at: iso(closed),
        });
      }
      // What this visit sets in motion.
      if (job.kind === 'service_call') {
        if (outcome === 'needs_return') {
          pushQueue(di + rng.int(1, 7), {
            id: rng.uuid(),
            unit: job.unit,
            kind: 'return_visit',
            origin: job.id,
            createdMs: closed + 600_000,
            secondVisit: false,
          });
        } else if (outcome === 'resolved' && rng.chance(0.08)) {
          const later = rng.int(2, 50);
          pushQueue(di + later, {
            id: rng.uuid(),
            unit: job.unit,
            kind: 'callback',
            origin: job.id,
            createdMs: closed + (later - 1) * DAY_MS,
            secondVisit: false,
          });
        }
      } else if (job.kind === 'planned_maintenance' && job.secondVisit) {
        pushQueue(di + 1, { id: job.id, unit: job.unit, kind: 'second', origin: job.id, createdMs: job.createdMs, secondVisit: false });
      }
    }
  }

  // Controller alarms: about 13 per unit over the three years, some in bursts of one code.
  const startMs = Date.parse(`${days[0]}T00:00:00Z`);
  const spanMs = BENCH_DAYS * DAY_MS;
  for (const u of unitList) {
    let n = rng.int(8, 18);
    while (n > 0) {
      const at = startMs + Math.floor(rng.next() * spanMs);
      const code = rng.pick(ALARM_CODES);
      const burst = rng.chance(0.15) ? Math.min(n, rng.int(2, 4)) : 1;
      for (let k = 0; k < burst; k++) {
        const raised = at + k * rng.int(1, 9) * DAY_MS;
        if (raised > startMs + spanMs) break;
        alarms.push({
          id: rng.uuid(),
          branch_id: branchId,
          unit_id: u.id,
          circuit: 1,
          code,
          description: null,
          raised_at: iso(raised),
          cleared_at: iso(raised + rng.int(10, 600) * 60_000),
          source: 'controller',
          created_at: iso(raised),
        });
      }
      n -= burst;
    }
  }
  return tables;
}

function workOrderRow(
  j: { id: string; unit: { id: string; siteId: string }; kind: string; origin: string | null; createdMs: number },
  branchId: string,
): DbRow {
  return {
    id: j.id,
    branch_id: branchId,
    site_id: j.unit.siteId,
    unit_id: j.unit.id,
    kind: j.kind,
    state: 'closed',
    priority: 'normal',
    complaint: j.kind === 'planned_maintenance' ? 'Planned maintenance' : 'No cooling',
    estimated_minutes: 90,
    origin_work_order_id: j.origin,
    return_needs: [],
    created_at: iso(j.createdMs),
    updated_at: iso(j.createdMs),
    closed_at: null,
  };
}

const iso = (ms: number) => new Date(ms).toISOString();
const round1 = (v: number) => Math.round(v * 10) / 10;
