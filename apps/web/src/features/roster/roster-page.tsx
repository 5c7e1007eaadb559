import { NotBuiltYet } from '@/components/ui/not-built';

export default function RosterPage() {
  return <NotBuiltYet title="Roster" purpose="The branch’s technician calendars, the unplaced work queue and each technician’s load." />;
}
