/**
 * Dispatcher, on a desktop (1440×900): signs in through the form, sees the dispatcher's navigation,
 * and every screen in it.
 *
 * Next (Roster): find the technician's return visit in the unplaced queue, ask for a suggestion,
 * book it, drag a booking to another day, see the load gauge change. Add the steps at the marked place.
 */
import assert from 'node:assert/strict';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Dispatcher on a desktop';

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'dispatcher');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('dispatcher', 'desktop'), 'the dispatcher sees Roster and Sites');
  await page.getByRole('heading', { level: 1, name: 'Roster' }).waitFor();
  await ctx.screen(page, 'roster');

  // ── Journey steps of the Roster go here ──

  await visitEveryScreen(ctx, page, labels);
}
