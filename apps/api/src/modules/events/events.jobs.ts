/** Prunes `live_events`: rows older than a day are no longer replayed (idempotent, any period). */
import { scheduledJobs, type ScheduledJob } from '../../jobs/scheduler';
import { pruneLiveEvents } from './events.service';

export const pruneLiveEventsJob: ScheduledJob = {
  name: 'live-events-prune',
  async run(ctx) {
    const removed = await pruneLiveEvents(ctx);
    if (removed) ctx.logger?.info({ job: 'live-events-prune', removed }, `job live-events-prune: ${removed} old live events removed`);
  },
};

/** Registered once per process (server.ts imports this file). */
if (!scheduledJobs.includes(pruneLiveEventsJob)) scheduledJobs.push(pruneLiveEventsJob);
