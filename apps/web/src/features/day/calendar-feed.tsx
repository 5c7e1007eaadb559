import { useMutation, useQueryClient } from '@tanstack/react-query';
import { CalendarPlus, Copy, RotateCw, Trash2 } from 'lucide-react';
import type { CalendarTokenResult, DayResponse } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { api, errorMessage } from '@/lib/api-client';

/** The technician's private calendar feed: create, copy, rotate, revoke. */
export function CalendarFeedCard({ feed }: { feed: DayResponse['calendarFeed'] }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const done = () => qc.invalidateQueries({ queryKey: ['day'] });
  const rotate = useMutation({
    mutationFn: () => api.post<CalendarTokenResult>('/api/calendar/token', undefined, { check: 'calendarTokenResultSchema' }),
    onSuccess: () => {
      notify(
        feed.active
          ? 'New calendar link made; the old link no longer works.'
          : 'Calendar link made. Add it to your phone’s calendar as a subscription.',
      );
      void done();
    },
    onError: (e) => notify(`No calendar link: ${errorMessage(e)}`, 'alarm'),
  });
  const revoke = useMutation({
    mutationFn: () => api.delete<void>('/api/calendar/token'),
    onSuccess: () => {
      notify('Calendar link turned off; subscribed calendars stop updating.');
      void done();
    },
    onError: (e) => notify(`Not turned off: ${errorMessage(e)}`, 'alarm'),
  });
  const copy = async () => {
    if (!feed.url) return;
    try {
      await navigator.clipboard.writeText(feed.url);
      notify('Calendar link copied.');
    } catch {
      notify('Could not copy; select the link and copy it by hand.', 'alarm');
    }
  };
  return (
    <Card title="Your day in your phone’s calendar">
      {feed.active && feed.url ? (
        <div className="flex flex-col gap-3 text-sm">
          <p className="text-slate">A private link: anyone with it can read your bookings. Make a new one if it was shared by mistake.</p>
          <label className="flex flex-col gap-1">
            <span className="font-medium">Calendar link (iCalendar)</span>
            <input
              readOnly
              value={feed.url}
              onFocus={(e) => e.currentTarget.select()}
              className="min-h-11 rounded-md border border-slate-line bg-frost px-3 font-mono text-xs"
            />
          </label>
          <div className="flex flex-wrap gap-2">
            <Button variant="secondary" onClick={copy}>
              <Copy className="size-4" aria-hidden="true" /> Copy link
            </Button>
            <Button variant="secondary" onClick={() => rotate.mutate()} busy={rotate.isPending}>
              <RotateCw className="size-4" aria-hidden="true" /> Make a new link
            </Button>
            <Button variant="ghost" onClick={() => revoke.mutate()} busy={revoke.isPending}>
              <Trash2 className="size-4" aria-hidden="true" /> Turn off
            </Button>
          </div>
        </div>
      ) : (
        <div className="flex flex-col items-start gap-3 text-sm">
          <p className="text-slate">
            Subscribe your phone’s calendar to a private link and your bookings show there, updated as the office changes them.
          </p>
          <Button variant="secondary" onClick={() => rotate.mutate()} busy={rotate.isPending}>
            <CalendarPlus className="size-4" aria-hidden="true" /> Make my calendar link
          </Button>
        </div>
      )}
    </Card>
  );
}
