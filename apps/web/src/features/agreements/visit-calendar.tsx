import FullCalendar from '@fullcalendar/react';
import dayGridPlugin from '@fullcalendar/daygrid';
import { workOrderStateLabels } from '@coilpath/contract/vocabulary';
import type { PlannedVisitRow } from '@coilpath/contract';

const stateColour: Record<string, string> = {
  unplaced: '#1F7A8C',
  booked: '#3F5E8C',
  en_route: '#3F5E8C',
  on_site: '#3F5E8C',
  closed: '#2E7D4F',
  cancelled: '#5B6B7A',
};

/** A month calendar of an agreement's planned visits (FullCalendar dayGrid; loaded lazily, it is heavy). */
export default function VisitCalendar({
  visits,
  name,
  initialDate,
  today,
}: {
  visits: PlannedVisitRow[];
  name: string;
  initialDate: string;
  today: string;
}) {
  return (
    <div className="coilpath-calendar text-sm" role="group" aria-label={`Planned visits of ${name} on a month calendar`}>
      <FullCalendar
        plugins={[dayGridPlugin]}
        initialView="dayGridMonth"
        initialDate={initialDate}
        now={today}
        height="auto"
        firstDay={1}
        headerToolbar={{ left: 'title', center: '', right: 'prev,today,next' }}
        // Text buttons: FullCalendar's chevron icons are role="img" without a name.
        buttonIcons={false}
        buttonText={{ prev: '‹ Previous', today: 'This month', next: 'Next ›' }}
        // A day cell is named by its date link alone, which hides the visits inside it from its name;
        // without the label the cell is named by its content (date and visits).
        dayCellDidMount={(arg) => arg.el.removeAttribute('aria-labelledby')}
        events={visits
          .filter((v) => v.plannedDate)
          .map((v) => ({
            id: v.workOrderId,
            title: `PM ${v.number ? `WO-${v.number}` : ''} · ${workOrderStateLabels[v.state]}`,
            start: v.plannedDate!,
            allDay: true,
            backgroundColor: stateColour[v.state],
            borderColor: stateColour[v.state],
          }))}
      />
    </div>
  );
}
