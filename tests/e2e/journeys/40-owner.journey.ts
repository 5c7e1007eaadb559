/**
 * Owner, on a desktop (1440×900): signs in through the form, sees the owner's navigation (with the
 * branch switcher), and every screen in it.
 *
 * Next (Fix Quality): read the first-time-fix rate, open the factory-defect review, create
 * inspection work orders from a model alert, export a CSV. Add the steps at the marked place.
 */
import assert from 'node:assert/strict';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Owner on a desktop';

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'owner');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('owner', 'desktop'), 'the owner sees every office screen');
  assert.equal(await page.getByRole('combobox', { name: 'Branch' }).count(), 1, 'the owner can switch branches');
  await page.getByRole('heading', { level: 1, name: 'Fix Quality' }).waitFor();
  await ctx.screen(page, 'fix-quality');

  // ── Journey steps of Fix Quality go here ──

  await visitEveryScreen(ctx, page, labels);
}
