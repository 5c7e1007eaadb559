/**
 * The tiny harness the browser journeys run in: each `*.journey.ts` exports
 * `run(ctx: JourneyContext)` and asserts with `node:assert`. The runner (`run.ts`) gives every
 * journey its own context; browsers it launched are closed after it, and console errors seen in
 * any of its pages fail it.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import axe from 'axe-core';
import type { BrowserContext, ConsoleMessage, Page } from 'playwright-core';
import { launchChromium } from './browser';

export const phone = { width: 390, height: 844 } as const;
export const desktop = { width: 1440, height: 900 } as const;

export interface JourneyContext {
  /** The server's address, e.g. `http://127.0.0.1:41234`. */
  base: string;
  /** The server's "now" (its clock may have been started at another instant with `COILPATH_NOW`). */
  now(): Date;
  /** A fresh Chromium (own profile, no cookies) with one page at the viewport. */
  launch(viewport: { width: number; height: number }): Promise<Page>;
  /** Saves a full-page screenshot as `test-results/e2e/<journey>-<nn>-<name>.png`. */
  screenshot(page: Page, name: string): Promise<string>;
  /** Runs axe-core on the page; throws on serious or critical violations. */
  axe(page: Page, name: string): Promise<void>;
  /** A screen as users see it: waits for it to settle, then screenshot and axe. */
  screen(page: Page, name: string): Promise<void>;
  /** Throws if any page of this journey logged a console error (or threw) so far. */
  expectNoConsoleErrors(): void;
  /** Console errors matching this (their text, URL, or `text (url)`) are expected (e.g. a refusal the journey provokes on purpose). */
  allowConsoleError(pattern: RegExp): void;
  /** Prints a step of the journey. */
  step(text: string): void;
}

export interface Journey {
  title?: string;
  /** A longer time limit than the runner's default (`E2E_JOURNEY_TIMEOUT_MS`, 240 s), for a journey that covers much. */
  timeLimitMs?: number;
  run(ctx: JourneyContext): Promise<void>;
}

interface Logged {
  text: string;
  url: string;
}

/** The session check on the sign-in page answers 401 before anyone signs in: not an error. */
const expectedByDefault = (e: Logged) => /status of 401/.test(e.text) && /\/api\/auth\/me(\?|$)/.test(e.url);

export function createJourneyContext(opts: {
  base: string;
  name: string;
  outDir: string;
  log: (s: string) => void;
  clockOffsetMs?: number;
}) {
  const contexts: BrowserContext[] = [];
  const errors: Logged[] = [];
  const allowed: RegExp[] = [];
  let shot = 0;
  mkdirSync(opts.outDir, { recursive: true });

  const watch = (page: Page) => {
    page.on('console', (m: ConsoleMessage) => {
      if (m.type() === 'error') errors.push({ text: m.text(), url: m.location().url });
    });
    page.on('pageerror', (e) => errors.push({ text: `uncaught: ${e.message}`, url: page.url() }));
  };

  const unexpected = () =>
    errors.filter((e) => !expectedByDefault(e) && !allowed.some((p) => p.test(e.text) || p.test(e.url) || p.test(`${e.text} (${e.url})`)));

  const ctx: JourneyContext = {
    base: opts.base,
    now: () => new Date(Date.now() + (opts.clockOffsetMs ?? 0)),
    async launch(viewport) {
      const browser = await launchChromium(viewport);
      contexts.push(browser);
      browser.setDefaultTimeout(15_000);
      browser.on('page', watch);
      const page = browser.pages()[0] ?? (await browser.newPage());
      watch(page);
      return page;
    },
    async screenshot(page, name) {
      shot += 1;
      const file = join(opts.outDir, `${opts.name}-${String(shot).padStart(2, '0')}-${name.replace(/[^\w-]+/g, '-')}.png`);
      await page.screenshot({ path: file, fullPage: true });
      return file;
    },
    async axe(page, name) {
      // Evaluated through the DevTools protocol, so the app's Content-Security-Policy stays on.
      await page.evaluate(axe.source);
      const violations = await page.evaluate(async () => {
        const w = window as unknown as { axe: typeof axe };
        const r = await w.axe.run(document, { resultTypes: ['violations'] });
        return r.violations.map((v) => ({
          id: v.id,
          impact: v.impact ?? null,
          help: v.help,
          nodes: v.nodes.slice(0, 3).map((n) => n.target.join(' ')),
          // The first offending element and axe's reason, so a failure can be understood from the log alone.
          first: v.nodes[0] ? `${v.nodes[0].html.slice(0, 600)}\n    ${(v.nodes[0].failureSummary ?? '').replace(/\n/g, ' ')}` : '',
        }));
      });
      const bad = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
      for (const v of violations.filter((x) => !bad.includes(x))) opts.log(`    axe (${v.impact}) on ${name}: ${v.id} — ${v.help}`);
      if (bad.length > 0) {
        const lines = bad.map((v) => `  ${v.impact} ${v.id}: ${v.help} at ${v.nodes.join(' | ')}\n    first: ${v.first}`);
        throw new Error(`axe found serious/critical accessibility violations on "${name}":\n${lines.join('\n')}`);
      }
    },
    async screen(page, name) {
      await page.waitForLoadState('networkidle');
      // Loading states ("Loading…") are gone before the screen counts as shown.
      await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'), undefined, { timeout: 15_000 });
      await ctx.screenshot(page, name);
      await ctx.axe(page, name);
    },
    expectNoConsoleErrors() {
      const bad = unexpected();
      if (bad.length > 0) {
        throw new Error(`the browser console showed errors:\n${bad.map((e) => `  ${e.text}${e.url ? ` (${e.url})` : ''}`).join('\n')}`);
      }
    },
    allowConsoleError(pattern) {
      allowed.push(pattern);
    },
    step(text) {
      opts.log(`    · ${text}`);
    },
  };

  return {
    ctx,
    async close() {
      for (const c of contexts.splice(0)) await c.close().catch(() => undefined);
    },
  };
}
