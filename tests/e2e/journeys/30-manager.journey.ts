/**
 * Branch manager, on a desktop (1440×900): signs in through the form, sees the manager's
 * navigation, and every screen in it.
 *
 * Next (Watchlist/Agreements): open the Watchlist, book the near-deadline leak repair, build a
 * quarterly agreement and see its visits on the calendar. Add the steps at the marked place.
 */
import assert from 'node:assert/strict';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Branch manager on a desktop';

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'branch_manager');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('branch_manager', 'desktop'), 'the manager sees Roster, Watchlist, Agreements, Fix Quality, Sites');
  await page.getByRole('heading', { level: 1, name: 'Watchlist' }).waitFor();
  await ctx.screen(page, 'watchlist');

  // ── Journey steps of the Watchlist and Agreements go here ──

  await visitEveryScreen(ctx, page, labels);
}
