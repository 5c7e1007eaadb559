/**
 * Browser journeys: `npm run test:e2e [-- <filter>…]`.
 *
 * Needs the built web app (`npm run build`) and Debian's Chromium (`apt-get install -y chromium`).
 * Starts the real server (`node --import tsx apps/api/src/server.ts`) on a free port with a fresh
 * data directory (demo data loads on first start), waits for /api/health, then runs every
 * `tests/e2e/journeys/*.journey.ts` in file-name order (or those whose name contains a filter).
 * Screenshots go to `test-results/e2e/`. Prints `N passed, N failed`; exits non-zero on a failure.
 * With `COILPATH_NOW=<ISO instant>` the server (and through its answers the web app) runs as if started at
 * that instant, so the journeys can be run on a chosen day; its screenshots go to `test-results/e2e/<instant>/`.
 * The server is stopped and the data directory removed in every case.
 */
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createJourneyContext, type Journey } from './harness';
import { repoRoot, startServer, type ServerProcess } from '../support/server-process';

const JOURNEY_TIME_LIMIT_MS = Number(process.env.E2E_JOURNEY_TIMEOUT_MS ?? 240_000);
const journeysDir = join(repoRoot, 'tests/e2e/journeys');
const at = process.env.COILPATH_NOW;
const outDir = join(repoRoot, 'test-results/e2e', at ? at.replace(/[^\dT-]+/g, '-') : '');
const log = (s: string) => console.log(s);

function preflight(): string | null {
  if (!existsSync(join(repoRoot, 'apps/web/dist/index.html'))) return 'apps/web/dist is missing: run `npm run build` first.';
  const chromium = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
  if (!existsSync(chromium)) return `Chromium is missing at ${chromium}: apt-get install -y chromium.`;
  return null;
}

function withTimeLimit<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} took longer than ${ms / 1000} s`)), ms);
  });
  return Promise.race([p, limit]).finally(() => clearTimeout(timer));
}

async function main(): Promise<number> {
  const problem = preflight();
  if (problem) {
    console.error(problem);
    console.log('0 passed, 1 failed');
    return 1;
  }
  const filters = process.argv.slice(2);
  const files = readdirSync(journeysDir)
    // An audit (`*.audit.ts`: every screen in every state, about 12 minutes) runs only when named.
    .filter((f) => f.endsWith('.journey.ts') || (filters.length > 0 && f.endsWith('.audit.ts')))
    .filter((f) => filters.length === 0 || filters.some((x) => f.includes(x)))
    .sort();
  if (files.length === 0) {
    console.error(`No journeys in ${journeysDir}${filters.length ? ` matching ${filters.join(', ')}` : ''}.`);
    console.log('0 passed, 1 failed');
    return 1;
  }
  rmSync(outDir, { recursive: true, force: true });

  const dataDir = mkdtempSync(join(tmpdir(), 'coilpath-e2e-'));
  let server: ServerProcess | undefined;
  const stopAll = async () => {
    await server?.stop(5000);
    rmSync(dataDir, { recursive: true, force: true });
  };
  const onSignal = (sig: NodeJS.Signals) => {
    void stopAll().finally(() => process.exit(sig === 'SIGINT' ? 130 : 143));
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);

  let passed = 0;
  let failed = 0;
  try {
    server = await startServer({ dataDir, env: { COILPATH_SEED: 'auto', COILPATH_JOBS: 'off' } });
    const configRes = await fetch(`${server.base}/api/config`);
    const config = (await configRes.json()) as { demo?: boolean };
    // The server's clock, when COILPATH_NOW set it elsewhere: the journeys reckon "today" by it.
    const serverNow = configRes.headers.get('x-coilpath-now');
    const clockOffsetMs = serverNow ? Date.parse(serverNow) - Date.now() : 0;
    if (at && !serverNow) throw new Error('COILPATH_NOW is set but the server does not say its clock (X-Coilpath-Now).');
    if (!config.demo) throw new Error('The demo data did not load on first start (GET /api/config says demo: false).');
    log(`Coilpath is up at ${server.base}${at ? `, its clock started at ${at}` : ''}; ${files.length} journey(s).`);

    for (const file of files) {
      const name = basename(basename(file, '.journey.ts'), '.audit.ts');
      const mod = (await import(pathToFileURL(join(journeysDir, file)).href)) as Journey;
      log(`\n▶ ${name}${mod.title ? ` — ${mod.title}` : ''}`);
      const { ctx, close } = createJourneyContext({ base: server.base, name, outDir, log, clockOffsetMs });
      const started = Date.now();
      try {
        if (typeof mod.run !== 'function') throw new Error(`${file} does not export async function run(ctx)`);
        await withTimeLimit(mod.run(ctx), Math.max(JOURNEY_TIME_LIMIT_MS, mod.timeLimitMs ?? 0), name);
        ctx.expectNoConsoleErrors();
        passed++;
        log(`✓ ${name} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
      } catch (e) {
        failed++;
        log(`✗ ${name}: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
      } finally {
        await close();
      }
    }
  } catch (e) {
    failed++;
    log(`✗ setup: ${e instanceof Error ? e.message : String(e)}`);
    if (server) log(server.output().slice(-4000));
  } finally {
    await stopAll();
  }
  log(`\nScreenshots: ${outDir}`);
  console.log(`${passed} passed, ${failed} failed`);
  return failed > 0 ? 1 : 0;
}

process.exitCode = await main();
