/**
 * Developer aid: sign in as someone and save a full-page screenshot of a screen.
 *   node --import tsx tests/e2e/screenshot.ts http://localhost:3000 /roster dispatch@coilpath.example out.png [width]
 */
import { launchChromium } from './browser';

const [base = 'http://localhost:3000', path = '/', email = 'owner@coilpath.example', out = 'test-results/screen.png', width = '1440'] =
  process.argv.slice(2);
const ctx = await launchChromium({ width: Number(width), height: Number(width) < 600 ? 844 : 900 });
const page = ctx.pages()[0] ?? (await ctx.newPage());
const errors: string[] = [];
page.on('console', (m) => {
  if (m.type() === 'error') errors.push(m.text());
});
const res = await page.request.post(`${base}/api/auth/sign-in`, {
  data: { email, password: process.env.COILPATH_PASSWORD ?? 'coilpath-demo' },
});
if (!res.ok()) throw new Error(`sign-in failed: ${res.status()}`);
await page.goto(`${base}${path}`, { waitUntil: 'networkidle' });
await page.screenshot({ path: out, fullPage: true });
console.log(`saved ${out}${errors.length ? `; console errors:\n${errors.join('\n')}` : ''}`);
await ctx.close();
