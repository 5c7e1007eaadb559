/**
 * Bad input, for every row of the route table that takes a body, a query or path parameters:
 * fast-check turns the row's minimal valid request into its opposites — wrong types, missing and
 * extra fields, huge strings, negative/NaN/huge numbers, impossible dates, SQL and HTML in text,
 * path traversal, whole bodies that are not objects, malformed JSON. Every answer must be below 500
 * with the JSON error shape on 4xx; whatever the row's zod schema refuses must be refused (4xx);
 * a refused request must leave every table's row count as it was; text that is accepted must come
 * back verbatim.
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { z } from 'zod';
import { apiErrorSchema } from '@coilpath/contract';
import { createTestApp, type TestApp } from '../../apps/api/src/testing/harness';
import { makeMatrixFixture, requestFor, sendRequest, rowCounts, type Caller, type MatrixFixture, type Side } from './matrix-fixture';
import { routeTable, type RequestSpec, type RouteRow } from './route-table';

/** Runs per route and input kind: enough variety, bounded so `npm test` stays quick. */
const RUNS = Number(process.env.BAD_INPUT_RUNS ?? 30);

let t: TestApp;
let f: MatrixFixture;
beforeAll(async () => {
  t = await createTestApp();
  f = await makeMatrixFixture(t.ctx);
});
afterAll(() => t?.close());

const nasty = {
  sql: ["'; DROP TABLE users; --", "Robert'); DELETE FROM sites WHERE ('1'='1", '1 OR 1=1', '" OR ""="'],
  html: ['<script>alert(1)</script>', '<img src=x onerror="alert(1)">', '</textarea><b>bold</b>', '&lt;&amp;&#39;'],
  traversal: ['../../etc/passwd', '..\\..\\windows\\win.ini', '/etc/shadow', '%2e%2e%2f%2e%2e%2fetc%2fpasswd', 'a/../../b.png'],
  dates: [
    '2026-02-30',
    '2026-13-01',
    '2026-00-10',
    '2025-02-29',
    '2026-02-30T10:00:00Z',
    '2026-06-01T25:61:00Z',
    '30/02/2026',
    'yesterday',
    '',
  ],
  numbers: [-1, -0.5, -1e9, 1e308, Number.MAX_SAFE_INTEGER * 16, 0.000001, NaN, Infinity, -Infinity],
  control: ['\u0000', 'a\u0000b', '\u202e', '\ud800', ' '.repeat(50)],
};

const anyJson: fc.Arbitrary<unknown> = fc.oneof(
  fc.integer(),
  fc.double(),
  fc.boolean(),
  fc.constant(null),
  fc.string({ maxLength: 20 }),
  fc.array(fc.oneof(fc.integer(), fc.string({ maxLength: 5 })), { maxLength: 3 }),
  fc.dictionary(fc.string({ maxLength: 5 }), fc.integer(), { maxKeys: 2 }),
);

const textValue = fc.oneof(
  fc.constantFrom(...nasty.sql, ...nasty.html, ...nasty.traversal, ...nasty.control),
  fc.integer({ min: 5_000, max: 300_000 }).map((n) => 'x'.repeat(n)),
);

type Mutation = { label: string; body?: unknown; rawBody?: string };

/** What the server receives: JSON turns NaN and ±Infinity into null. */
function onTheWire(m: Mutation): { ok: true; value: unknown } | { ok: false } {
  try {
    return { ok: true, value: JSON.parse(m.rawBody ?? JSON.stringify(m.body)) as unknown };
  } catch {
    return { ok: false };
  }
}

/** fast-check prints counterexamples with this, so a 300 kB string shows as its label. */
function labelled<T extends { label: string }>(m: T): T {
  return Object.assign(m, { [fc.toStringMethod]: () => m.label });
}

/** The opposites of a valid body: each mutation changes one thing (or the whole body). */
function badBodies(valid: Record<string, unknown>, schema: z.ZodType): fc.Arbitrary<Mutation> {
  const shape = (schema as unknown as { shape?: Record<string, unknown> }).shape ?? {};
  const fields = [...new Set([...Object.keys(valid), ...Object.keys(shape)])];
  const field = fields.length ? fc.constantFrom(...fields) : fc.constant('name');
  const set = (k: string, v: unknown, label: string): Mutation => ({ label: `${label} ${k}`, body: { ...valid, [k]: v } });
  const arb: fc.Arbitrary<Mutation> = fc.oneof(
    fc.tuple(field, anyJson).map(([k, v]) => set(k, v, 'wrong type for')),
    field.map((k) => {
      const { [k]: _gone, ...rest } = valid;
      return { label: `missing ${k}`, body: rest };
    }),
    fc
      .tuple(
        fc.string({ minLength: 1, maxLength: 12 }).filter((k) => !fields.includes(k) && k !== '__proto__'),
        anyJson,
      )
      .map(([k, v]) => set(k, v, 'extra field')),
    fc
      .tuple(field, textValue)
      .map(([k, v]) => set(k, v, `text ${JSON.stringify(v.slice(0, 20))}${v.length > 20 ? `… (${v.length})` : ''} in`)),
    fc.tuple(field, fc.constantFrom(...nasty.numbers)).map(([k, v]) => set(k, v, `number ${v} in`)),
    fc.tuple(field, fc.constantFrom(...nasty.dates)).map(([k, v]) => set(k, v, `date ${v} in`)),
    fc.constantFrom<Mutation>(
      { label: 'body is an array', body: [valid] },
      { label: 'body is a string', rawBody: '"text"' },
      { label: 'body is a number', rawBody: '42' },
      { label: 'body is null', rawBody: 'null' },
      { label: 'malformed JSON', rawBody: '{"name": ' },
      { label: 'body over the 1 MB JSON limit', rawBody: JSON.stringify({ ...valid, padding: 'x'.repeat(1_100_000) }) },
    ),
  );
  return arb.map(labelled);
}

type QueryMutation = { label: string; query: Record<string, string | string[]> };

function badQueries(valid: Record<string, string>, schema: z.ZodType): fc.Arbitrary<QueryMutation> {
  const shape = (schema as unknown as { shape?: Record<string, unknown> }).shape ?? {};
  const fields = [...new Set([...Object.keys(valid), ...Object.keys(shape)])];
  const field = fields.length ? fc.constantFrom(...fields) : fc.constant('q');
  const value = fc.oneof(
    fc.constantFrom(
      'abc',
      '-1',
      '0',
      'NaN',
      'Infinity',
      '1e400',
      '1.5',
      'true',
      '',
      ...nasty.dates,
      ...nasty.sql,
      ...nasty.html,
      ...nasty.traversal,
    ),
    fc.integer({ min: 1_000, max: 4_000 }).map((n) => 'y'.repeat(n)),
    fc.string({ maxLength: 30 }),
  );
  const arb: fc.Arbitrary<QueryMutation> = fc.oneof(
    fc.tuple(field, value).map(([k, v]) => ({ label: `${k}=${JSON.stringify(v.slice(0, 24))}`, query: { ...valid, [k]: v } })),
    fc
      .tuple(field, fc.array(value, { minLength: 2, maxLength: 3 }))
      .map(([k, v]) => ({ label: `${k} repeated`, query: { ...valid, [k]: v } })),
    fc
      .tuple(
        fc.string({ minLength: 1, maxLength: 10 }).filter((k) => !fields.includes(k)),
        value,
      )
      .map(([k, v]) => ({
        label: `extra ${k}`,
        query: { ...valid, [k]: v },
      })),
  );
  return arb.map(labelled);
}

/** Values that are never a valid id, date or index in a path segment. */
const badSegments = [
  'not-an-id',
  '..%2F..%2Fetc%2Fpasswd',
  '2026-02-30',
  "'%20OR%201%3D1--",
  'x'.repeat(300),
  '%00',
  '00000000-0000-0000-0000-00000000000g',
];

/** Who exercises a row: the first caller whose own-branch call succeeds. */
function happyCaller(row: RouteRow): Caller | null {
  for (const c of ['owner', 'branch_manager', 'dispatcher', 'technician', 'anonymous'] as const) {
    const o = row.expect[c];
    const own = typeof o === 'number' ? o : o.own;
    if (own >= 200 && own < 300) return c;
  }
  return null;
}

/** All values under `key` anywhere in a JSON value. */
function valuesAt(body: unknown, key: string, out: unknown[] = []): unknown[] {
  if (Array.isArray(body)) body.forEach((b) => valuesAt(b, key, out));
  else if (body && typeof body === 'object') {
    for (const [k, v] of Object.entries(body)) {
      if (k === key) out.push(v);
      valuesAt(v, key, out);
    }
  }
  return out;
}

async function check(
  row: RouteRow,
  caller: Caller,
  side: Side,
  label: string,
  refused: boolean,
  override: (spec: RequestSpec) => RequestSpec & { rawBody?: string },
  textField?: { key: string; value: string },
) {
  const spec = override(await requestFor(f, row, caller, side));
  // Work an earlier accepted request queued (a reset mail) must not land inside this one's count.
  await t.ctx.jobs.idle();
  const before = await rowCounts(t.ctx.db);
  const res = await sendRequest(t.app, f, row, caller, spec);
  const where = `${row.method} ${row.path} as ${caller}, ${label}: answered ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`;
  expect(res.status, where).toBeLessThan(500);
  if (refused) expect(res.status, `${where} — the schema refuses this, so must the route`).toBeGreaterThanOrEqual(400);
  if (res.status >= 400) {
    expect(apiErrorSchema.safeParse(res.body).success, `${where} — not the JSON error shape`).toBe(true);
    await t.ctx.jobs.idle();
    const after = await rowCounts(t.ctx.db);
    expect(after, `${where} — a refused request changed row counts`).toEqual(before);
  } else if (textField) {
    const echoed = valuesAt(res.body, textField.key).filter((v) => typeof v === 'string');
    if (echoed.length > 0) expect(echoed, `${where} — text must come back verbatim`).toContain(textField.value);
  }
  return res;
}

const rowsWithInput = routeTable.filter((r) => !r.noBadInput && (r.body || r.query || r.path.includes(':')));

describe('bad input', () => {
  it('knows the schema of every route that takes a body or a query', async () => {
    expect(rowsWithInput.length).toBeGreaterThan(0);
    const { own } = await f.makeSides();
    const unnamed: string[] = [];
    for (const r of routeTable) {
      const caller = happyCaller(r);
      if (!r.request || r.noBadInput || caller === null) continue;
      const spec = await r.request(f, own, caller);
      if (spec.body !== undefined && !r.body) unnamed.push(`${r.method} ${r.path}: body without \`body\` schema`);
      if (spec.query !== undefined && !r.query) unnamed.push(`${r.method} ${r.path}: query without \`query\` schema`);
    }
    expect(unnamed, 'rows in route-table.ts must carry their zod schemas (or say noBadInput: why)').toEqual([]);
  });

  for (const row of rowsWithInput) {
    const caller = happyCaller(row);
    it.runIf(caller !== null)(`${row.method} ${row.path}`, { timeout: 120_000 }, async () => {
      const who = caller!;
      const { own } = await f.makeSides();
      const valid = row.request ? await row.request(f, own, who) : { path: row.path };

      if (valid.files) {
        // Uploads: traversal and markup in file names are accepted only as harmless display names;
        // content that is not what it claims, a missing file and a bad kind are refused.
        const file = valid.files[0]!;
        const upload =
          (name: string, content: Buffer, body: Record<string, string> = (valid.body ?? {}) as Record<string, string>) =>
          (spec: RequestSpec) => ({
            ...spec,
            body,
            files: [{ ...file, name, content }],
          });
        for (const name of [
          ...nasty.traversal.map((t) => `${t}.png`),
          '<img src=x onerror=alert(1)>.png',
          `${'n'.repeat(400)}.png`,
          'CON.png',
          '.htaccess',
        ]) {
          const res = await check(row, who, own, `file name ${name.slice(0, 40)}`, false, upload(name, file.content));
          const names = valuesAt(res.body, 'displayName').filter((v): v is string => typeof v === 'string');
          for (const n of names) expect(n, `stored display name for ${name.slice(0, 40)}`).not.toMatch(/[\\/]|\.\./);
        }
        await check(row, who, own, 'text content named .png', true, upload('photo.png', Buffer.from('just text, not a picture')));
        await check(
          row,
          who,
          own,
          'HTML content named .png',
          true,
          upload('photo.png', Buffer.from('<html><script>alert(1)</script></html>')),
        );
        await check(row, who, own, 'empty file', true, upload('photo.png', Buffer.alloc(0)));
        await check(row, who, own, 'kind is not a kind', true, upload('photo.png', file.content, { kind: 'executable' }));
        await check(row, who, own, 'no file at all', true, (spec) => ({ ...spec, files: undefined, body: undefined }));
      } else if (row.body) {
        const schema = row.body;
        const validBody = (valid.body ?? {}) as Record<string, unknown>;
        await fc.assert(
          fc.asyncProperty(badBodies(validBody, schema), async (m) => {
            // Refused by the schema (or not JSON at all): the route must refuse it too. A route may
            // accept more (e.g. a larger body limit for imports); then it must only not fail.
            const wire = onTheWire(m);
            const refused = !wire.ok || !schema.safeParse(wire.value).success;
            // Text the schema accepts is stored as the schema leaves it (trimmed, never escaped).
            const parsed = wire.ok ? schema.safeParse(wire.value) : undefined;
            const text = Object.entries((m.body ?? {}) as Record<string, unknown>).find(
              ([k, v]) => row.textFields?.includes(k) && typeof v === 'string' && v !== validBody[k],
            );
            const stored = parsed?.success && text ? (parsed.data as Record<string, unknown>)[text[0]] : undefined;
            await check(
              row,
              who,
              own,
              m.label,
              refused,
              (spec) => ({ ...spec, body: m.body, rawBody: m.rawBody }),
              text && typeof stored === 'string' ? { key: text[0], value: stored } : undefined,
            );
          }),
          { numRuns: RUNS },
        );
        // Every free-text field, deterministically: PostgreSQL text cannot hold U+0000.
        for (const k of row.textFields ?? []) {
          await check(row, who, own, `NUL character in ${k}`, true, (spec) => ({ ...spec, body: { ...validBody, [k]: 'a\u0000b' } }));
          await check(row, who, own, `unpaired surrogate in ${k}`, true, (spec) => ({ ...spec, body: { ...validBody, [k]: 'a\ud800b' } }));
        }
      }

      if (row.query) {
        const schema = row.query;
        await fc.assert(
          fc.asyncProperty(badQueries(valid.query ?? {}, schema), async (m) => {
            const refused = !schema.safeParse(m.query).success;
            await check(row, who, own, `query ${m.label}`, refused, (spec) => ({ ...spec, query: m.query as Record<string, string> }));
          }),
          { numRuns: RUNS },
        );
      }

      const patternSegments = row.path.split('/');
      const paramAt = patternSegments.flatMap((s, i) => (s.startsWith(':') ? [i] : []));
      for (const i of paramAt) {
        for (const bad of badSegments) {
          await check(row, who, own, `path ${patternSegments[i]}=${bad.slice(0, 24)}`, true, (spec) => {
            const parts = spec.path.split('/');
            parts[i] = bad;
            return { ...spec, path: parts.join('/') };
          });
        }
      }
    });
  }
});
