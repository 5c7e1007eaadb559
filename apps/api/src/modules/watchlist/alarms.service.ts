/** Alarms: entered from the form, posted by other systems, or imported from a CSV file. */
import Papa from 'papaparse';
import { and, desc, eq, gte, inArray, lte } from 'drizzle-orm';
import {
  alarmCodeSchema,
  type AlarmImportError,
  type AlarmImportResult,
  type AlarmImportRow,
  type AlarmRow,
  type SessionUser,
  alarmImportSchema,
  alarmInputSchema,
  alarmListQuerySchema,
} from '@coilpath/contract';
import { zonedInstant } from '@coilpath/calc';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import { alarms, circuits, sites, units } from '../../db/schema';
import { assertBranch } from '../../auth/policy';
import { HttpError, notFound, unprocessable } from '../../lib/errors';
import { importText } from '../../lib/text-file';
import { branchFilter, oneBranch } from './scope';
import { actAs, changeAs } from '../events/actor';

/** Most rows one import may carry. */
export const MAX_IMPORT_ROWS = 10_000;
/** An alarm raised later than this past "now" is refused (clock skew allowance). */
const FUTURE_SLACK_MS = 5 * 60_000;

const alarmColumns = {
  id: alarms.id,
  branchId: alarms.branchId,
  unitId: alarms.unitId,
  unitTag: units.tag,
  unitSerial: units.serial,
  siteName: sites.name,
  circuit: alarms.circuit,
  code: alarms.code,
  description: alarms.description,
  raisedAt: alarms.raisedAt,
  clearedAt: alarms.clearedAt,
  source: alarms.source,
};

function toRow(r: { raisedAt: Date; clearedAt: Date | null } & Omit<AlarmRow, 'raisedAt' | 'clearedAt'>): AlarmRow {
  return { ...r, raisedAt: r.raisedAt.toISOString(), clearedAt: r.clearedAt?.toISOString() ?? null };
}

export async function listAlarms(ctx: AppContext, user: SessionUser, q: z.infer<typeof alarmListQuerySchema>): Promise<AlarmRow[]> {
  const rows = await ctx.db
    .select(alarmColumns)
    .from(alarms)
    .innerJoin(units, eq(units.id, alarms.unitId))
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(and(branchFilter(user, q.branchId, alarms.branchId), q.unitId ? eq(alarms.unitId, q.unitId) : undefined))
    .orderBy(desc(alarms.raisedAt))
    .limit(q.limit);
  return rows.map(toRow);
}

export async function createAlarm(ctx: AppContext, user: SessionUser, input: z.infer<typeof alarmInputSchema>): Promise<AlarmRow> {
  const [unit] = await ctx.db.select({ id: units.id, branchId: units.branchId }).from(units).where(eq(units.id, input.unitId)).limit(1);
  if (!unit) throw notFound('unit');
  assertBranch(user, unit.branchId, 'unit');
  const raisedAt = new Date(input.raisedAt);
  if (raisedAt.getTime() > ctx.clock.now().getTime() + FUTURE_SLACK_MS)
    throw unprocessable('The alarm is dated in the future; check the date and time.');
  const clearedAt = input.clearedAt ? new Date(input.clearedAt) : null;
  if (clearedAt && clearedAt < raisedAt) throw unprocessable('An alarm cannot clear before it was raised.');
  if (input.circuit !== null) {
    const [c] = await ctx.db
      .select({ id: circuits.id })
      .from(circuits)
      .where(and(eq(circuits.unitId, unit.id), eq(circuits.number, input.circuit)))
      .limit(1);
    if (!c) throw unprocessable(`The unit has no circuit ${input.circuit}.`);
  }
  const [a] = await changeAs(ctx.db, user.id, (tx) =>
    tx
      .insert(alarms)
      .values({
        branchId: unit.branchId,
        unitId: unit.id,
        circuit: input.circuit,
        code: input.code,
        description: input.description ?? null,
        raisedAt,
        clearedAt,
        source: input.source,
      })
      .returning({ id: alarms.id }),
  );
  const [row] = await ctx.db
    .select(alarmColumns)
    .from(alarms)
    .innerJoin(units, eq(units.id, alarms.unitId))
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(eq(alarms.id, a!.id));
  return toRow(row!);
}

/** Header names accepted for each column (compared lower-case, spaces and dashes as underscores). */
const headerAliases: Record<string, 'serial' | 'circuit' | 'code' | 'raisedAt'> = {
  unit_serial: 'serial',
  serial: 'serial',
  serial_number: 'serial',
  circuit: 'circuit',
  code: 'code',
  alarm_code: 'code',
  raised_at: 'raisedAt',
  raised: 'raisedAt',
  time: 'raisedAt',
};
const required = ['serial', 'circuit', 'code', 'raisedAt'] as const;
const fieldNames: Record<(typeof required)[number], string> = {
  serial: 'unit_serial',
  circuit: 'circuit',
  code: 'code',
  raisedAt: 'raised_at',
};

const WITH_OFFSET = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:?\d{2})$/i;
const LOCAL = /^(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2})(:\d{2})?$/;

/** Reads `raised_at`: an ISO-8601 instant with offset, or a local date and time in the branch's zone. */
function readInstant(value: string, timeZone: string): Date | null {
  const v = value.trim();
  if (WITH_OFFSET.test(v)) {
    const d = new Date(v.replace(' ', 'T'));
    return Number.isNaN(d.getTime()) ? null : d;
  }
  const m = LOCAL.exec(v);
  if (m) {
    try {
      const ms = zonedInstant(m[1]!, m[2]!, timeZone) + (m[3] ? Number(m[3].slice(1)) * 1000 : 0);
      return Number.isFinite(ms) ? new Date(ms) : null;
    } catch {
      return null;
    }
  }
  return null;
}

/**
 * Checks a CSV of alarms row by row and, on commit, writes all of it in one transaction — or, when
 * any row has an error, nothing (422 listing every error with its row). A dry run only reports.
 */
export async function importAlarms(
  ctx: AppContext,
  user: SessionUser,
  input: z.infer<typeof alarmImportSchema>,
): Promise<AlarmImportResult> {
  const branch = await oneBranch(ctx.db, user, input.branchId);
  const errors: AlarmImportError[] = [];
  const { text, encoding } = importText(input);
  const parsed = Papa.parse<Record<string, string>>(text, {
    header: true,
    skipEmptyLines: 'greedy',
    transformHeader: (h) =>
      h
        .trim()
        .toLowerCase()
        .replace(/[\s-]+/g, '_'),
  });
  const headers = parsed.meta.fields ?? [];
  const columnOf = new Map<string, string>();
  for (const h of headers) {
    const key = headerAliases[h];
    if (key && !columnOf.has(key)) columnOf.set(key, h);
  }
  const missing = required.filter((k) => !columnOf.has(k));
  if (missing.length > 0) {
    errors.push({
      row: 0,
      field: null,
      message: `The header row must name the columns unit_serial, circuit, code, raised_at; missing: ${missing.map((k) => fieldNames[k]).join(', ')}.`,
    });
  }
  for (const e of parsed.errors) {
    // Papa's row index is 0-based over data rows; Coilpath numbers data rows from 1.
    errors.push({ row: e.row === undefined ? 0 : e.row + 1, field: null, message: `${e.message}.` });
  }
  if (parsed.data.length > MAX_IMPORT_ROWS)
    errors.push({ row: 0, field: null, message: `At most ${MAX_IMPORT_ROWS} rows per file; this one has ${parsed.data.length}.` });
  if (parsed.data.length === 0 && missing.length === 0) errors.push({ row: 0, field: null, message: 'The file has a header but no rows.' });

  const rows: AlarmImportRow[] = [];
  if (missing.length === 0 && parsed.data.length <= MAX_IMPORT_ROWS) {
    const cell = (r: Record<string, string>, k: (typeof required)[number]) => String(r[columnOf.get(k)!] ?? '').trim();
    const serials = [...new Set(parsed.data.map((r) => cell(r, 'serial')).filter(Boolean))];
    const unitRows = serials.length
      ? await ctx.db
          .select({ id: units.id, tag: units.tag, serial: units.serial })
          .from(units)
          .where(and(eq(units.branchId, branch.id), inArray(units.serial, serials)))
      : [];
    const bySerial = new Map<string, { id: string; tag: string; serial: string }[]>();
    for (const u of unitRows) bySerial.set(u.serial, [...(bySerial.get(u.serial) ?? []), u]);
    const circuitRows = unitRows.length
      ? await ctx.db
          .select({ unitId: circuits.unitId, number: circuits.number })
          .from(circuits)
          .where(
            inArray(
              circuits.unitId,
              unitRows.map((u) => u.id),
            ),
          )
      : [];
    const circuitSet = new Set(circuitRows.map((c) => `${c.unitId}:${c.number}`));
    const now = ctx.clock.now().getTime();

    parsed.data.forEach((r, i) => {
      const row = i + 1;
      const before = errors.length;
      const serial = cell(r, 'serial');
      const matches = bySerial.get(serial) ?? [];
      if (!serial) errors.push({ row, field: 'unit_serial', message: 'The unit serial is empty.' });
      else if (matches.length === 0)
        errors.push({ row, field: 'unit_serial', message: `No unit with serial "${serial}" in ${branch.name}.` });
      else if (matches.length > 1)
        errors.push({
          row,
          field: 'unit_serial',
          message: `Serial "${serial}" matches ${matches.length} units in ${branch.name}; enter this alarm from the unit's file.`,
        });
      const unit = matches.length === 1 ? matches[0]! : null;

      const circuitText = cell(r, 'circuit');
      let circuit: number | null = null;
      if (circuitText !== '') {
        const n = Number(circuitText);
        if (!Number.isInteger(n) || n < 1 || n > 20)
          errors.push({ row, field: 'circuit', message: `The circuit "${circuitText}" is not a whole number from 1 to 20.` });
        else if (unit && !circuitSet.has(`${unit.id}:${n}`))
          errors.push({ row, field: 'circuit', message: `Unit ${unit.tag} has no circuit ${n}.` });
        else circuit = n;
      }

      const code = alarmCodeSchema.safeParse(cell(r, 'code'));
      if (!code.success) errors.push({ row, field: 'code', message: code.error.issues[0]?.message ?? 'Bad alarm code.' });

      const raisedText = cell(r, 'raisedAt');
      const raisedAt = readInstant(raisedText, branch.timeZone);
      if (!raisedAt)
        errors.push({
          row,
          field: 'raised_at',
          message: `"${raisedText}" is not a date and time; use 2026-12-02T14:05:00Z or 2026-12-02 08:05 (${branch.timeZone}).`,
        });
      else if (raisedAt.getTime() > now + FUTURE_SLACK_MS)
        errors.push({ row, field: 'raised_at', message: `${raisedText} is in the future.` });

      if (errors.length === before && unit && code.success && raisedAt) {
        rows.push({
          row,
          unitId: unit.id,
          unitTag: unit.tag,
          serial,
          circuit,
          code: code.data,
          raisedAt: raisedAt.toISOString(),
          duplicate: false,
        });
      }
    });

    // Duplicates: the same unit, code and instant already stored, or earlier in this file.
    if (rows.length) {
      const times = rows.map((r) => new Date(r.raisedAt).getTime());
      const existing = await ctx.db
        .select({ unitId: alarms.unitId, code: alarms.code, raisedAt: alarms.raisedAt })
        .from(alarms)
        .where(
          and(
            inArray(alarms.unitId, [...new Set(rows.map((r) => r.unitId))]),
            gte(alarms.raisedAt, new Date(Math.min(...times))),
            lte(alarms.raisedAt, new Date(Math.max(...times))),
          ),
        );
      const seen = new Set(existing.map((e) => `${e.unitId}|${e.code}|${e.raisedAt.toISOString()}`));
      for (const r of rows) {
        const key = `${r.unitId}|${r.code}|${r.raisedAt}`;
        if (seen.has(key)) r.duplicate = true;
        seen.add(key);
      }
    }
  }

  errors.sort((a, b) => a.row - b.row);
  const fresh = rows.filter((r) => !r.duplicate);
  const result: AlarmImportResult = {
    mode: input.mode,
    encoding,
    total: parsed.data.length,
    rows,
    errors,
    written: 0,
    skipped: rows.length - fresh.length,
  };
  if (input.mode === 'dry_run') return result;
  if (errors.length > 0) {
    const rowsWithErrors = new Set(errors.map((e) => e.row)).size;
    throw new HttpError(
      422,
      'import_refused',
      `Nothing was imported: ${errors.length} error${errors.length === 1 ? '' : 's'} in ${rowsWithErrors} row${rowsWithErrors === 1 ? '' : 's'}. Fix the file and import it again.`,
      result,
    );
  }
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    for (let i = 0; i < fresh.length; i += 500) {
      await tx.insert(alarms).values(
        fresh.slice(i, i + 500).map((r) => ({
          branchId: branch.id,
          unitId: r.unitId,
          circuit: r.circuit,
          code: r.code,
          raisedAt: new Date(r.raisedAt),
          source: 'csv' as const,
        })),
      );
    }
  });
  return { ...result, written: fresh.length };
}
