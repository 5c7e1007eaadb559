import { useState } from 'react';
import { FileUp, Plus } from 'lucide-react';
import { useBranch } from '@/lib/branch';
import { formatInZone } from '@/lib/format';
import { PageHeader } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { LeakCasesSection } from './leak-cases';
import { RepeatAlarmsSection, ReturnVisitsSection } from './sections';
import { AlarmForm, AlarmImport } from './alarm-entry';
import { AlarmSourcesSection } from './alarm-sources';
import { appNow } from '@/lib/now';

/** The branch manager's Watchlist: leak-case deadlines, repeat-alarm units, return visits to book. */
export default function WatchlistPage() {
  const { branchId, branch, timeZone } = useBranch();
  const [panel, setPanel] = useState<'none' | 'alarm' | 'import'>('none');
  return (
    <>
      <PageHeader
        title="Watchlist"
        subtitle={
          <>
            Leak-case deadlines, units that alarm again and again, and return visits to book — {branch ? branch.name : 'all branches'},{' '}
            {formatInZone(appNow(), timeZone, 'EEEE d MMMM yyyy')} ({timeZone}).
          </>
        }
        actions={
          <>
            <Button variant="secondary" onClick={() => setPanel(panel === 'import' ? 'none' : 'import')} aria-expanded={panel === 'import'}>
              <FileUp className="size-4" aria-hidden="true" /> Import alarms
            </Button>
            <Button onClick={() => setPanel(panel === 'alarm' ? 'none' : 'alarm')} aria-expanded={panel === 'alarm'}>
              <Plus className="size-4" aria-hidden="true" /> Record an alarm
            </Button>
          </>
        }
      />
      <div className="flex flex-col gap-8">
        {panel === 'alarm' && <AlarmForm branchId={branchId} timeZone={timeZone} onDone={() => setPanel('none')} />}
        {panel === 'import' && <AlarmImport branchId={branchId} onDone={() => setPanel('none')} />}
        <LeakCasesSection branchId={branchId} />
        <RepeatAlarmsSection branchId={branchId} timeZone={timeZone} />
        <ReturnVisitsSection branchId={branchId} timeZone={timeZone} />
        <AlarmSourcesSection branchId={branchId} timeZone={timeZone} />
      </div>
    </>
  );
}
