/**
 * Technician, on a phone (390×844): signs in through the form, sees the technician's navigation,
 * and every screen in it.
 *
 * Next (My Day/Visit): open My Day, open the first stop, record readings and see superheat/subcooling,
 * upload a photo, close the visit as needing a return. Add the steps at the marked place below,
 * each screen through `ctx.screen(page, '<name>')` (screenshot + axe).
 */
import assert from 'node:assert/strict';
import type { JourneyContext } from '../harness';
import { phone } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Technician on a phone';

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(phone);
  await signInThroughForm(ctx, page, 'technician');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('technician', 'phone'), 'the technician sees My Day, Visit and Unit file');
  await page.getByRole('heading', { level: 1, name: 'My Day' }).waitFor();
  await ctx.screen(page, 'my-day');

  // ── Journey steps of the My Day/Visit screens go here ──

  await visitEveryScreen(ctx, page, labels);
}
