import Papa from 'papaparse';
import { refrigerantIds, type RefrigerantId } from '@coilpath/calc';
import {
  applianceCategories,
  applianceCategoryLabels,
  isoDateSchema,
  normalizeImportHeader,
  unitImportLimits,
  unitImportRequiredColumns,
  unitKindLabels,
  unitKinds,
  type ApplianceCategory,
  type SessionUser,
  type UnitImportColumn,
  type UnitImportRequest,
  type UnitImportResult,
  type UnitImportRowError,
  type UnitKind,
} from '@coilpath/contract';
import type { AppContext } from '../../context';
import * as repo from './units.repo';
import { badRequest, conflict, HttpError } from '../../lib/errors';
import { getSite } from '../sites/sites.service';
import { importText } from '../../lib/text-file';
import { actAs } from '../events/actor';

const squash = (s: string) => s.toLowerCase().replace(/[^a-z0-9]/g, '');

const refrigerantBySquashed = new Map<string, RefrigerantId>(refrigerantIds.map((r) => [squash(r), r]));
/** "R410A", "r-410a" and "410A" all mean R-410A. */
export function matchRefrigerant(value: string): RefrigerantId | null {
  const s = squash(value);
  return refrigerantBySquashed.get(s) ?? refrigerantBySquashed.get(`r${s}`) ?? null;
}

function matchEnum<T extends string>(value: string, codes: readonly T[], labels: Record<T, string>): T | null {
  const s = squash(value);
  return codes.find((c) => squash(c) === s || squash(labels[c]) === s) ?? null;
}

const numberPattern = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

export interface ImportedUnit {
  row: number;
  tag: string;
  kind: UnitKind;
  make: string;
  model: string;
  serial: string;
  installDate: string | null;
  warrantyEnd: string | null;
  refrigerant: RefrigerantId;
  fullChargeLb: number;
  applianceCategory: ApplianceCategory;
  tonnage: number | null;
  notes: string | null;
  circuits: number;
  compressorsPerCircuit: number;
}

/** The file is refused as a whole (not a units CSV): 400 with a reason and nothing else. */
function notACsv(message: string): HttpError {
  return new HttpError(400, 'not_csv', message);
}

/**
 * Parses and checks every data row of an equipment CSV, collecting every problem with its
 * 1-based data row number (the header is not counted; the file line is row + 1).
 */
export function parseUnitCsv(text: string): { units: ImportedUnit[]; errors: UnitImportRowError[]; rowCount: number } {
  if (/[\u0000-\u0008\u000E-\u001F]/.test(text.slice(0, 4096))) {
    throw notACsv('This file is not a CSV text file (it contains binary data). Save the sheet as CSV (comma-separated) and try again.');
  }
  const parsed = Papa.parse<Record<string, string>>(text, {
    header: true,
    skipEmptyLines: 'greedy',
    transformHeader: normalizeImportHeader,
  });
  const fields = (parsed.meta.fields ?? []).filter(Boolean);
  const missing = unitImportRequiredColumns.filter((c) => !fields.includes(c));
  if (missing.length === unitImportRequiredColumns.length || (missing.length > 0 && fields.length < 3)) {
    throw notACsv(
      `This file is not an equipment CSV: its first row must name the columns (${unitImportRequiredColumns.join(', ')}, …). Download the template and fill it in.`,
    );
  }
  if (missing.length > 0) {
    throw notACsv(
      `The header row lacks ${missing.length === 1 ? 'the column' : 'these columns'}: ${missing.join(', ')}. Download the template to see every column.`,
    );
  }
  const dupHeaders = fields.filter((f, i) => fields.indexOf(f) !== i);
  if (dupHeaders.length) throw notACsv(`The header row names ${[...new Set(dupHeaders)].join(', ')} more than once.`);
  if (parsed.data.length > unitImportLimits.maxRows) {
    throw badRequest(
      `The file has ${parsed.data.length} rows; import at most ${unitImportLimits.maxRows.toLocaleString('en-US')} at a time.`,
    );
  }

  const errors: UnitImportRowError[] = [];
  const add = (row: number, column: UnitImportColumn | null, message: string) => errors.push({ row, column, message });
  // papaparse's own row problems (too many or too few fields, unclosed quotes).
  const structural = new Set<number>();
  for (const e of parsed.errors) {
    if (typeof e.row !== 'number') continue;
    const row = e.row + 1;
    structural.add(row);
    const msg =
      e.code === 'TooFewFields'
        ? 'The row has fewer fields than the header.'
        : e.code === 'TooManyFields'
          ? 'The row has more fields than the header (a comma inside a value needs quotes).'
          : e.code === 'MissingQuotes'
            ? 'A quoted value is never closed.'
            : e.message;
    add(row, null, msg);
  }

  const out: ImportedUnit[] = [];
  const seen = new Map<string, number>();
  parsed.data.forEach((raw, i) => {
    const row = i + 1;
    if (structural.has(row)) return;
    const v = (c: UnitImportColumn) => (raw[c] ?? '').trim();
    let ok = true;
    const fail = (c: UnitImportColumn | null, m: string) => {
      ok = false;
      add(row, c, m);
    };
    for (const c of unitImportRequiredColumns) if (!v(c)) fail(c, `${c} is missing.`);

    const kind = v('kind') ? matchEnum(v('kind'), unitKinds, unitKindLabels) : null;
    if (v('kind') && !kind) fail('kind', `Unknown kind "${v('kind')}". Use one of ${unitKinds.join(', ')}.`);

    const refrigerant = v('refrigerant') ? matchRefrigerant(v('refrigerant')) : null;
    if (v('refrigerant') && !refrigerant)
      fail('refrigerant', `Unknown refrigerant "${v('refrigerant')}". Use one of ${refrigerantIds.join(', ')}.`);

    const category = v('appliance_category') ? matchEnum(v('appliance_category'), applianceCategories, applianceCategoryLabels) : null;
    if (v('appliance_category') && !category)
      fail('appliance_category', `Unknown appliance category "${v('appliance_category')}". Use one of ${applianceCategories.join(', ')}.`);

    let fullCharge = NaN;
    if (v('full_charge_lb')) {
      fullCharge = numberPattern.test(v('full_charge_lb')) ? Number(v('full_charge_lb')) : NaN;
      if (Number.isNaN(fullCharge)) fail('full_charge_lb', `Full charge "${v('full_charge_lb')}" is not a number (pounds, e.g. 18.5).`);
      else if (fullCharge < 0 || fullCharge > 100_000) fail('full_charge_lb', `Full charge ${fullCharge} lb is out of range.`);
    }

    let tonnage: number | null = null;
    if (v('tonnage')) {
      tonnage = numberPattern.test(v('tonnage')) ? Number(v('tonnage')) : NaN;
      if (Number.isNaN(tonnage) || tonnage < 0) fail('tonnage', `Tonnage "${v('tonnage')}" is not a number.`);
    }

    const date = (c: 'install_date' | 'warranty_end', label: string) => {
      if (!v(c)) return null;
      if (!isoDateSchema.safeParse(v(c)).success) {
        fail(c, `${label} "${v(c)}" is not a real date; use YYYY-MM-DD.`);
        return null;
      }
      return v(c);
    };
    const installDate = date('install_date', 'Install date');
    const warrantyEnd = date('warranty_end', 'Warranty end');
    if (installDate && warrantyEnd && warrantyEnd < installDate) fail('warranty_end', 'The warranty ends before the install date.');

    const count = (c: 'circuits' | 'compressors_per_circuit', label: string) => {
      if (!v(c)) return 1;
      const n = /^\d+$/.test(v(c)) ? Number(v(c)) : NaN;
      if (!(n >= 1 && n <= 8)) {
        fail(c, `${label} "${v(c)}" must be a whole number from 1 to 8.`);
        return 1;
      }
      return n;
    };
    const circuitCount = count('circuits', 'Circuits');
    const compressors = count('compressors_per_circuit', 'Compressors per circuit');

    for (const [c, max] of [
      ['tag', 40],
      ['make', 80],
      ['model', 80],
      ['serial', 80],
      ['notes', 4000],
    ] as const) {
      if (v(c).length > max) fail(c, `${c} is longer than ${max} characters.`);
    }

    if (v('make') && v('serial')) {
      const key = `${squash(v('make'))}|${v('serial').toLowerCase()}`;
      const first = seen.get(key);
      if (first !== undefined)
        fail('serial', `Duplicate serial "${v('serial')}" for make ${v('make')}: already on row ${first} of this file.`);
      else seen.set(key, row);
    }

    if (ok && kind && refrigerant && category) {
      out.push({
        row,
        tag: v('tag'),
        kind,
        make: v('make'),
        model: v('model'),
        serial: v('serial'),
        installDate,
        warrantyEnd,
        refrigerant,
        fullChargeLb: fullCharge,
        applianceCategory: category,
        tonnage,
        notes: v('notes') || null,
        circuits: circuitCount,
        compressorsPerCircuit: compressors,
      });
    }
  });
  return { units: out, errors, rowCount: parsed.data.length };
}

/** Units already in the database with the same make and serial (one query per 1,000 serials). */
async function existingSerials(db: AppContext['db'], candidates: ImportedUnit[]) {
  const found = new Map<string, { tag: string; siteName: string }>();
  const serials = [...new Set(candidates.map((u) => u.serial))];
  for (let i = 0; i < serials.length; i += 1000) {
    const rows = await repo.unitsBySerials(db, serials.slice(i, i + 1000));
    for (const r of rows) found.set(`${squash(r.make)}|${r.serial.toLowerCase()}`, { tag: r.tag, siteName: r.siteName });
  }
  return found;
}

const byRow = (a: UnitImportRowError, b: UnitImportRowError) => a.row - b.row;

/**
 * Dry run: checks every row and answers every problem. Commit: the same checks, then writes every
 * unit and its circuits in one transaction — or nothing at all when any row is bad.
 */
export async function importUnits(ctx: AppContext, user: SessionUser, input: UnitImportRequest): Promise<UnitImportResult> {
  const site = await getSite(ctx.db, user, input.siteId);
  if (site.archivedAt) throw conflict('site_archived', `${site.name} is archived. Unarchive the site before importing units.`);
  const { text, encoding } = importText(input);
  const parsed = parseUnitCsv(text);
  if (parsed.rowCount === 0) throw notACsv('The file has a header row but no units under it.');

  const existing = await existingSerials(ctx.db, parsed.units);
  const errors = [...parsed.errors];
  const good: ImportedUnit[] = [];
  for (const u of parsed.units) {
    const dup = existing.get(`${squash(u.make)}|${u.serial.toLowerCase()}`);
    if (dup)
      errors.push({
        row: u.row,
        column: 'serial',
        message: `Duplicate serial "${u.serial}": a ${u.make} unit with it already exists (${dup.tag} at ${dup.siteName}).`,
      });
    else good.push(u);
  }
  errors.sort(byRow);
  const badRows = new Set(errors.map((e) => e.row));
  const result: UnitImportResult = {
    mode: input.mode,
    encoding,
    rowCount: parsed.rowCount,
    validCount: parsed.rowCount - badRows.size,
    errors,
    created: 0,
  };
  if (input.mode === 'dry-run') return result;
  if (errors.length > 0) {
    const rows = [...badRows].slice(0, 10).join(', ');
    throw new HttpError(
      422,
      'import_refused',
      `Nothing was imported: ${badRows.size} of ${parsed.rowCount} rows ${badRows.size === 1 ? 'has' : 'have'} problems (row${badRows.size === 1 ? '' : 's'} ${rows}${badRows.size > 10 ? ', …' : ''}). Fix them and import the file again.`,
      result,
    );
  }

  try {
    await ctx.db.transaction(async (tx) => {
      await actAs(tx, user.id);
      for (let i = 0; i < good.length; i += 500) {
        const batch = good.slice(i, i + 500);
        const ids = await repo.insertUnits(
          tx,
          batch.map((u) => ({
            branchId: site.branchId,
            siteId: site.id,
            tag: u.tag,
            kind: u.kind,
            make: u.make,
            model: u.model,
            serial: u.serial,
            installDate: u.installDate,
            warrantyEnd: u.warrantyEnd,
            refrigerant: u.refrigerant,
            fullChargeLb: u.fullChargeLb,
            applianceCategory: u.applianceCategory,
            tonnage: u.tonnage,
            notes: u.notes,
          })),
        );
        const cs = batch.flatMap((u, j) =>
          Array.from({ length: u.circuits }, (_, k) => ({ unitId: ids[j]!.id, number: k + 1, compressorCount: u.compressorsPerCircuit })),
        );
        for (let k = 0; k < cs.length; k += 2000) await repo.insertCircuits(tx, cs.slice(k, k + 2000));
      }
    });
  } catch (e) {
    // Someone saved one of these serials between the check and the write: nothing was written.
    if (
      (e as { code?: string; cause?: { code?: string } })?.code === '23505' ||
      (e as { cause?: { code?: string } })?.cause?.code === '23505'
    ) {
      throw conflict(
        'duplicate_serial',
        'Nothing was imported: a unit with one of these serials was saved meanwhile. Check the file again.',
      );
    }
    throw e;
  }
  return { ...result, created: good.length };
}
