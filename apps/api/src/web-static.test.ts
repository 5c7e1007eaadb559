import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createServer, get, type IncomingHttpHeaders, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Express } from 'express';
import { createApp } from './app';
import { createTestApp, type TestApp } from './testing/harness';
import { makeBranch, makeUser, TEST_PASSWORD } from './testing/fixtures';

/**
 * The built web app as the server sends it: compressed by Accept-Encoding (RFC 9110 §8.4, §12.5.3), cached by
 * name (RFC 9111 §5.2.2; `immutable` RFC 8246). A small stand-in for `apps/web/dist` keeps the test free of a
 * full build.
 */
let dist: string;
let t: TestApp;
let app: Express;

// Text that compresses well and is well over the 1 kB threshold of `compression`.
const script = `export const rows = [${Array.from({ length: 400 }, (_, i) => `{"n":${i},"label":"row ${i}"}`).join(',')}];\n`;
const indexHtml = `<!doctype html><html><head><title>Coilpath</title><script type="module" src="/assets/index-3f9a1c2b.js"></script></head><body><div id="root"></div>${'<!-- padding -->'.repeat(100)}</body></html>`;

let server: Server;

/**
 * An answer as it went over the wire, not decoded (supertest and fetch both decompress): status, headers and
 * the raw bytes.
 */
function raw(path: string, headers: Record<string, string>): Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }> {
  const { port } = server.address() as AddressInfo;
  return new Promise((resolve, reject) => {
    get({ host: '127.0.0.1', port, path, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      res.on('error', reject);
    }).on('error', reject);
  });
}

beforeAll(async () => {
  dist = mkdtempSync(join(tmpdir(), 'coilpath-dist-'));
  mkdirSync(join(dist, 'assets'));
  writeFileSync(join(dist, 'index.html'), indexHtml);
  writeFileSync(join(dist, 'assets', 'index-3f9a1c2b.js'), script);
  writeFileSync(join(dist, 'coilpath-mark.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');
  t = await createTestApp();
  app = createApp({ ...t.ctx, config: { ...t.ctx.config, webDist: dist } });
  server = createServer(app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
});
afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  await t.close();
  rmSync(dist, { recursive: true, force: true });
});

describe('compression', () => {
  it('sends a script brotli-compressed to a client that accepts br, and says it varies by Accept-Encoding', async () => {
    const res = await raw('/assets/index-3f9a1c2b.js', { 'Accept-Encoding': 'br, gzip' });
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('br');
    expect(res.headers['vary']).toMatch(/Accept-Encoding/i);
    const body = res.body;
    expect(body.length).toBeLessThan(Buffer.byteLength(script) / 4);
    expect(brotliDecompressSync(body).toString()).toBe(script);
  });

  it('sends gzip to a client that accepts only gzip, and the plain bytes to one that accepts neither', async () => {
    const gz = await raw('/assets/index-3f9a1c2b.js', { 'Accept-Encoding': 'gzip' });
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(gunzipSync(gz.body).toString()).toBe(script);

    const plain = await raw('/assets/index-3f9a1c2b.js', { 'Accept-Encoding': 'identity' });
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.toString()).toBe(script);
  });

  it('compresses API JSON too', async () => {
    const branch = await makeBranch(t.ctx.db);
    const owner = await makeUser(t.ctx.db, 'owner', null);
    for (let i = 0; i < 12; i++) await makeUser(t.ctx.db, 'technician', branch.id);
    const signIn = await request(app).post('/api/auth/sign-in').send({ email: owner.email, password: TEST_PASSWORD });
    const cookie = String(signIn.headers['set-cookie']).split(';')[0]!;
    const res = await raw('/api/users', { 'Accept-Encoding': 'gzip', Cookie: cookie });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.headers['content-encoding']).toBe('gzip');
    const page = JSON.parse(gunzipSync(res.body).toString()) as { rows: unknown[]; total: number };
    expect(page.total).toBeGreaterThanOrEqual(13);
    expect(page.rows.length).toBeGreaterThan(0);
  });
});

describe('cache headers', () => {
  it('keeps hashed assets a year, immutable', async () => {
    const res = await request(app).get('/assets/index-3f9a1c2b.js');
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('revalidates index.html, whether asked for by name, at / or at a screen address (the SPA fallback)', async () => {
    for (const path of ['/index.html', '/', '/roster/board', '/units/3b0c6f4e-8f6e-4a8e-9a43-0f1a2b3c4d5e']) {
      const res = await request(app).get(path);
      expect(res.status, path).toBe(200);
      expect(res.headers['content-type'], path).toMatch(/text\/html/);
      expect(res.headers['cache-control'], path).toBe('no-cache');
      expect(res.text, path).toBe(indexHtml);
    }
  });

  it('keeps an unhashed public file an hour', async () => {
    const res = await request(app).get('/coilpath-mark.svg');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('public, max-age=3600');
  });

  it('answers 404 for a hashed asset that is not there, never the index page', async () => {
    const res = await request(app).get('/assets/index-00000000.js');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).not.toMatch(/text\/html/);
    expect(res.headers['cache-control']).toBe('no-store');
  });

  it('leaves unknown API routes to the API (JSON 404, not the index page)', async () => {
    const res = await request(app).get('/api/no-such-route');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});
