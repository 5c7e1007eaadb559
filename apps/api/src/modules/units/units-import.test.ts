import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { count, eq, inArray } from 'drizzle-orm';
import Papa from 'papaparse';
import iconv from 'iconv-lite';
import { unitImportColumns, unitImportExample } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { circuits, units } from '../../db/schema';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let dispatcher: Agent;

beforeAll(async () => {
  t = await createTestApp();
  f = await makeTwoBranches(t.ctx.db);
  dispatcher = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
});
afterAll(() => t.close());

const header = unitImportColumns.join(',');
const row = (i: number, over: Partial<Record<(typeof unitImportColumns)[number], string>> = {}) =>
  unitImportColumns.map((c) => ({ ...unitImportExample, tag: `RTU-${i}`, serial: `IMP-${i}`, ...over })[c]).join(',');

async function unitsAt(siteId: string) {
  const [n] = await t.ctx.db.select({ n: count() }).from(units).where(eq(units.siteId, siteId));
  return n!.n;
}

describe('POST /api/units/import', () => {
  it('imports a clean file: dry run writes nothing, commit writes every unit and its circuits', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const csv = [
      header,
      row(1),
      row(2, { circuits: '3', compressors_per_circuit: '2', refrigerant: 'r410a', kind: 'Rooftop unit' }),
      row(3, { install_date: '', warranty_end: '', tonnage: '' }),
    ].join('\n');

    const dry = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv });
    expect(dry.status).toBe(200);
    expect(dry.body).toEqual({ mode: 'dry-run', encoding: 'UTF-8', rowCount: 3, validCount: 3, errors: [], created: 0 });
    expect(await unitsAt(site.id)).toBe(1);

    const commit = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv });
    expect(commit.status).toBe(200);
    expect(commit.body).toMatchObject({ mode: 'commit', rowCount: 3, validCount: 3, created: 3 });
    expect(await unitsAt(site.id)).toBe(4);
    const [two] = await t.ctx.db.select().from(units).where(eq(units.serial, 'IMP-2'));
    expect(two).toMatchObject({
      refrigerant: 'R-410A',
      kind: 'rooftop_unit',
      fullChargeLb: 18.5,
      installDate: '2021-05-14',
      branchId: f.a.id,
    });
    const cs = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, two!.id));
    expect(cs.map((c) => [c.number, c.compressorCount]).sort()).toEqual([
      [1, 2],
      [2, 2],
      [3, 2],
    ]);
    // The same file again: every serial now exists, so it is refused as a whole.
    const again = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv });
    expect(again.status).toBe(422);
    expect(again.body.error.details.errors.map((e: { row: number }) => e.row)).toEqual([1, 2, 3]);
    expect(again.body.error.details.errors[0].message).toContain('already exists');
  });

  it('a file with bad rows among good ones writes nothing and names every error with its row number', async () => {
    const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const csv = [
      header,
      row(101),
      row(102, { refrigerant: 'R-999' }), // 2: unknown refrigerant
      row(103),
      row(104, { full_charge_lb: 'twelve' }), // 4: not a number
      row(101, { tag: 'RTU-dup' }), // 5: duplicate serial of row 1 in the file
      row(106, { make: 'Testmake', serial: unit.serial }), // 6: already in the database
      row(107, { model: '' }), // 7: missing field
      row(108, { install_date: '2021-02-30' }), // 8: not a real date
      row(109),
    ].join('\n');

    const dry = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv });
    expect(dry.status).toBe(200);
    expect(dry.body.rowCount).toBe(9);
    expect(dry.body.validCount).toBe(3);
    const byRow = Object.fromEntries(dry.body.errors.map((e: { row: number; column: string; message: string }) => [e.row, e]));
    expect(Object.keys(byRow).map(Number)).toEqual([2, 4, 5, 6, 7, 8]);
    expect(byRow[2]).toMatchObject({ column: 'refrigerant' });
    expect(byRow[2].message).toContain('Unknown refrigerant "R-999"');
    expect(byRow[4]).toMatchObject({ column: 'full_charge_lb' });
    expect(byRow[4].message).toContain('not a number');
    expect(byRow[5]).toMatchObject({ column: 'serial' });
    expect(byRow[5].message).toContain('row 1');
    expect(byRow[6].message).toContain('already exists');
    expect(byRow[7]).toMatchObject({ column: 'model', message: 'model is missing.' });
    expect(byRow[8]).toMatchObject({ column: 'install_date' });

    const commit = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv });
    expect(commit.status).toBe(422);
    expect(commit.body.error.code).toBe('import_refused');
    expect(commit.body.error.message).toContain('Nothing was imported');
    expect(commit.body.error.details.errors).toEqual(dry.body.errors);
    expect(await unitsAt(site.id)).toBe(1);
    const written = await t.ctx.db
      .select()
      .from(units)
      .where(inArray(units.serial, ['IMP-101', 'IMP-103', 'IMP-109']));
    expect(written).toHaveLength(0);
  });

  it('refuses a file that is not a CSV of units', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d]).toString('latin1');
    const cases = [
      png,
      '{"units": [{"tag": "RTU-1"}]}',
      'Dear team,\nplease add the new rooftop units.\nThanks',
      'tag,make\nRTU-1,Examplemake',
    ];
    for (const csv of cases) {
      const res = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv });
      expect(res.status, csv.slice(0, 20)).toBe(400);
      expect(res.body.error.code).toBe('not_csv');
      expect(res.body.error.message.length).toBeGreaterThan(20);
    }
    const empty = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv: header + '\n' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toContain('no units');
    expect(await unitsAt(site.id)).toBe(1);
  });

  it('reads structural problems (too many fields) as row errors', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const csv = [header, row(201), `${row(202)},extra,fields`, row(203)].join('\n');
    const dry = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv });
    expect(dry.body.errors).toEqual([{ row: 2, column: null, message: expect.stringContaining('more fields') }]);
  });

  it('imports a 5,000-row file in one transaction', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const rows = Array.from({ length: 5000 }, (_, i) => ({ ...unitImportExample, tag: `U-${i + 1}`, serial: `BULK-${i + 1}` }));
    const csv = Papa.unparse(rows, { columns: [...unitImportColumns] });
    const res = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ rowCount: 5000, validCount: 5000, created: 5000, errors: [] });
    expect(await unitsAt(site.id)).toBe(5001);
    const [c] = await t.ctx.db
      .select({ n: count() })
      .from(circuits)
      .innerJoin(units, eq(units.id, circuits.unitId))
      .where(eq(units.siteId, site.id));
    expect(c!.n).toBe(2 + 5000 * 2);
  });

  it('is branch-scoped and office-only', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.b.id);
    const csv = [header, row(301)].join('\n');
    expect((await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv })).status).toBe(404);
    const tech = await signedInAgent(t.app, f.inB.technician.email, TEST_PASSWORD);
    expect((await tech.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv })).status).toBe(403);
  });
});

describe('POST /api/units/import: what the file is encoded in', () => {
  const polishRow = (i: number) => row(i, { make: 'Kältetechnik Łódź', notes: 'Dach — strona północna; sprężarka “A”' });

  it('converts a spreadsheet’s legacy Windows-1252 export sent as bytes, and stores it as typed', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const csv = [header, row(301, { make: 'Kältetechnik', notes: 'Café roof — “north” side; 5 €' })].join('\r\n');
    const file = iconv.encode(csv, 'windows-1252').toString('base64');
    const dry = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', file });
    expect(dry.status).toBe(200);
    expect(dry.body).toMatchObject({ encoding: 'windows-1252', rowCount: 1, validCount: 1, errors: [] });
    const commit = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', file });
    expect(commit.status).toBe(200);
    const [u] = await t.ctx.db.select().from(units).where(eq(units.serial, 'IMP-301'));
    expect(u).toMatchObject({ make: 'Kältetechnik', notes: 'Café roof — “north” side; 5 €' });
  });

  it('converts a Central European (Windows-1250) export with Polish names', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const file = iconv.encode([header, polishRow(311)].join('\r\n'), 'windows-1250').toString('base64');
    const res = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', file });
    expect(res.status).toBe(200);
    expect(res.body.encoding).toBe('windows-1250');
    const [u] = await t.ctx.db.select().from(units).where(eq(units.serial, 'IMP-311'));
    expect(u).toMatchObject({ make: 'Kältetechnik Łódź', notes: 'Dach — strona północna; sprężarka “A”' });
  });

  it('reads UTF-8 bytes with or without a byte-order mark as they are', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const text = [header, row(321, { notes: 'Nguyễn Thị Hương; Łukasz Żółć' })].join('\r\n');
    for (const bytes of [Buffer.from(text, 'utf8'), Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text, 'utf8')])]) {
      const res = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', file: bytes.toString('base64') });
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ encoding: 'UTF-8', rowCount: 1, validCount: 1 });
    }
    expect(
      (await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', file: Buffer.from(text).toString('base64') }))
        .status,
    ).toBe(200);
    const [u] = await t.ctx.db.select().from(units).where(eq(units.serial, 'IMP-321'));
    expect(u!.notes).toBe('Nguyễn Thị Hương; Łukasz Żółć');
  });

  it('refuses what it cannot read, with the way forward, and stores nothing — never a U+FFFD', async () => {
    const { site } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const before = await unitsAt(site.id);
    // Text a client decoded with the wrong encoding: the accents became U+FFFD.
    const mangled = new TextDecoder('utf-8').decode(iconv.encode([header, polishRow(331)].join('\n'), 'windows-1250'));
    expect(mangled).toContain('\uFFFD');
    const asText = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', csv: mangled });
    expect(asText.status).toBe(400);
    expect(asText.body.error.code).toBe('not_utf8');
    expect(asText.body.error.message).toMatch(/could not be read.*CSV UTF-8/);
    // Japanese Shift_JIS: not a Latin code page Coilpath converts.
    const sjis = iconv
      .encode([header, row(332, { notes: '東京の屋上ユニット、北側の機械室の隣にあります' })].join('\n'), 'shift_jis')
      .toString('base64');
    const japanese = await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', file: sjis });
    expect(japanese.status).toBe(400);
    expect(japanese.body.error.code).toBe('not_utf8');
    expect(japanese.body.error.message).toContain('Shift_JIS');
    expect(japanese.body.error.message).toContain('save it as "CSV UTF-8 (comma delimited)"');
    // Says UTF-8 (byte-order mark) but is not.
    const lying = Buffer.concat([
      Buffer.from([0xef, 0xbb, 0xbf]),
      iconv.encode([header, polishRow(333)].join('\n'), 'windows-1250'),
    ]).toString('base64');
    expect((await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'commit', file: lying })).body.error.code).toBe(
      'not_utf8',
    );
    // Both or neither of csv and file; a file that is not base64.
    expect((await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run' })).status).toBe(400);
    expect((await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', csv: header, file: 'AAAA' })).status).toBe(
      400,
    );
    expect((await dispatcher.post('/api/units/import').send({ siteId: site.id, mode: 'dry-run', file: 'not base64!' })).status).toBe(400);
    expect(await unitsAt(site.id)).toBe(before);
    const stored = await t.ctx.db.select({ make: units.make, notes: units.notes }).from(units);
    for (const u of stored) expect(`${u.make}${u.notes ?? ''}`).not.toContain('\uFFFD');
  });
});
