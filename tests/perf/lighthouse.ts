/**
 * The bench's Lighthouse phase: the Route screen (`/day`) as the demo technician, Lighthouse's default mobile
 * profile (a mid-range phone's screen, simulated slow 4G and a 4× slower CPU), categories performance and
 * accessibility, in Debian's Chromium (`CHROME_PATH`, default /usr/bin/chromium). Lighthouse 12 (13 needs
 * Node 22.19). The session cookie, from an HTTP sign-in, goes with every request through `extraHeaders`.
 *
 * Budgets: performance ≥ 0.9 and accessibility 1.0 — on a quiet machine. The performance score
 * follows from timings Lighthouse simulates from what it observed, so a busy CPU lowers it; the load average
 * is printed beside the scores.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { loadavg } from 'node:os';
import * as chromeLauncher from 'chrome-launcher';
import lighthouse from 'lighthouse';

export const LIGHTHOUSE_BUDGETS = { performance: 0.9, accessibility: 1 } as const;

const METRICS = [
  ['first-contentful-paint', 'First Contentful Paint', 'ms'],
  ['largest-contentful-paint', 'Largest Contentful Paint', 'ms'],
  ['total-blocking-time', 'Total Blocking Time', 'ms'],
  ['cumulative-layout-shift', 'Cumulative Layout Shift', ''],
  ['speed-index', 'Speed Index', 'ms'],
] as const;

export interface AccessibilityFailure {
  id: string;
  title: string;
  /** CSS selectors of the failing nodes, as Lighthouse (axe) reports them. */
  nodes: string[];
}

export interface LighthouseRun {
  performance: number;
  accessibility: number;
  /** Lighthouse's own score (0–1) and value of each metric in METRICS, by audit id. */
  metrics: Record<string, { value: number; score: number | null }>;
  failures: AccessibilityFailure[];
  /** Lighthouse's estimate of how much the host slowed the page (its benchmark index; lower = slower). */
  benchmarkIndex: number | null;
  loadAverage: number[];
}

export interface LighthouseFigures {
  url: string;
  date: string;
  stops: number;
  lighthouseVersion: string;
  chromium: string;
  runs: LighthouseRun[];
  /** The run with the median performance score (the figures reported). */
  median: LighthouseRun;
}

class RetryableLighthouseError extends Error {}

interface Score {
  score: number | null;
}

async function once(url: string, cookie: string, chromePath: string): Promise<{ run: LighthouseRun; version: string; userAgent: string }> {
  const chrome = await chromeLauncher.launch({ chromePath, chromeFlags: ['--headless=new', '--no-sandbox'], logLevel: 'silent' });
  try {
    const result = await lighthouse(url, {
      port: chrome.port,
      output: 'json',
      logLevel: 'error',
      onlyCategories: ['performance', 'accessibility'],
      extraHeaders: { Cookie: cookie },
    });
    if (!result) throw new Error('Lighthouse returned no result');
    const lhr = result.lhr;
    if (lhr.runtimeError) {
      const message = `Lighthouse: ${lhr.runtimeError.code}: ${lhr.runtimeError.message}`;
      throw lhr.runtimeError.code === 'NO_NAVSTART' ? new RetryableLighthouseError(message) : new Error(message);
    }
    // A page that ended elsewhere (the sign-in page: the cookie did not take) would measure the wrong screen.
    if (!lhr.finalDisplayedUrl.includes('/day')) throw new Error(`Lighthouse ended on ${lhr.finalDisplayedUrl}, not the Route screen`);
    const categoryScore = (id: string) => {
      const c = lhr.categories[id];
      if (!c || c.score === null) throw new Error(`Lighthouse gave no ${id} score`);
      return c.score;
    };
    const metrics: LighthouseRun['metrics'] = {};
    for (const [id] of METRICS) {
      const a = lhr.audits[id];
      metrics[id] = { value: a?.numericValue ?? Number.NaN, score: a?.score ?? null };
    }
    const failures: AccessibilityFailure[] = [];
    for (const ref of lhr.categories.accessibility?.auditRefs ?? []) {
      const a = lhr.audits[ref.id];
      if (!a || ref.weight === 0 || (a as Score).score === null || (a as Score).score === 1) continue;
      const items = (a.details as { items?: { node?: { selector?: string } }[] } | undefined)?.items ?? [];
      failures.push({ id: a.id, title: a.title, nodes: items.map((i) => i.node?.selector ?? '(no node)') });
    }
    const run: LighthouseRun = {
      performance: categoryScore('performance'),
      accessibility: categoryScore('accessibility'),
      metrics,
      failures,
      benchmarkIndex: lhr.environment.benchmarkIndex ?? null,
      loadAverage: loadavg(),
    };
    return { run, version: lhr.lighthouseVersion, userAgent: lhr.environment.hostUserAgent };
  } finally {
    chrome.kill();
  }
}

/** Runs Lighthouse `runs` times on the page (each in a fresh Chromium); reports the run with the median performance. */
export async function runLighthouse(opts: {
  base: string;
  path: string;
  date: string;
  stops: number;
  cookie: string;
  runs: number;
  log: (s: string) => void;
}): Promise<LighthouseFigures> {
  const chromePath = process.env.CHROME_PATH ?? '/usr/bin/chromium';
  if (!existsSync(chromePath)) throw new Error(`Chromium is missing at ${chromePath}: apt-get install -y chromium (or set CHROME_PATH)`);
  const url = `${opts.base}${opts.path}`;
  const runs: LighthouseRun[] = [];
  let version = '';
  let userAgent = '';
  for (let i = 0; i < opts.runs; i++) {
    opts.log(`lighthouse: ${url} (run ${i + 1} of ${opts.runs}, load average ${loadavg()[0]!.toFixed(2)})`);
    // Lighthouse sometimes loses its trace's start on a busy machine (NO_NAVSTART, "run Lighthouse again"): retried twice.
    let r: Awaited<ReturnType<typeof once>> | undefined;
    for (let attempt = 1; !r; attempt++) {
      try {
        r = await once(url, opts.cookie, chromePath);
      } catch (e) {
        if (attempt >= 3 || !(e instanceof RetryableLighthouseError)) throw e;
        opts.log(`lighthouse: ${e.message}; again (attempt ${attempt + 1} of 3)`);
      }
    }
    runs.push(r.run);
    version = r.version;
    userAgent = r.userAgent;
  }
  const sorted = [...runs].sort((a, b) => a.performance - b.performance);
  const median = sorted[Math.floor((sorted.length - 1) / 2)]!;
  // The user agent carries only the major version (156.0.0.0); the binary says the whole of it.
  const reported = /Chromium ([\d.]+)/.exec(spawnSync(chromePath, ['--version'], { encoding: 'utf8' }).stdout ?? '')?.[1];
  const chromium = reported ?? /(?:HeadlessChrome|Chrome)\/([\d.]+)/.exec(userAgent)?.[1] ?? 'unknown';
  return { url, date: opts.date, stops: opts.stops, lighthouseVersion: version, chromium, runs, median };
}

/** The phase's table rows: measure, budget, value, result. */
export function lighthouseRows(f: LighthouseFigures): string[][] {
  const m = f.median;
  const score = (v: number) => v.toFixed(2);
  const rows: string[][] = [
    [
      'Performance score',
      `≥ ${score(LIGHTHOUSE_BUDGETS.performance)}`,
      score(m.performance),
      m.performance >= LIGHTHOUSE_BUDGETS.performance ? 'pass' : 'FAIL',
    ],
    [
      'Accessibility score',
      `= ${score(LIGHTHOUSE_BUDGETS.accessibility)}`,
      score(m.accessibility),
      m.accessibility >= LIGHTHOUSE_BUDGETS.accessibility ? 'pass' : 'FAIL',
    ],
  ];
  for (const [id, label, unit] of METRICS) {
    const x = m.metrics[id]!;
    const value = unit === 'ms' ? `${Math.round(x.value)} ms` : x.value.toFixed(3);
    rows.push([label, '(info)', `${value}${x.score === null ? '' : ` (score ${x.score.toFixed(2)})`}`, '']);
  }
  return rows;
}
