import { useMemo } from 'react';
import { useSearchParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { ArrowDownRight, ArrowUpRight, FileDown, Minus } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import type { FixQualityReport } from '@coilpath/contract';
import { useBranch } from '@/lib/branch';
import { useUser } from '@/lib/session';
import { PageHeader } from '@/components/ui/page';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { formatNumber, formatPercent } from '@/lib/format';
import { GroupRateChart, MonthTrendChart } from './charts';
import { FactoryDefectReviewSection } from './factory-defects';
import { csvUrl, pdfUrl, reportQuery, type PeriodQuery } from './fix-quality-api';
import { GroupSection } from './group-table';
import { ModelAlertsSection } from './model-alerts';
import { appNow } from '@/lib/now';
import { activePreset, previousPeriod, reportPresetKeys, reportPresets, type ReportPresetKey } from '@coilpath/calc';

const presetLabels: Record<ReportPresetKey, string> = {
  last12: 'Last 12 months',
  last30: 'Last 30 days',
  quarter: 'This quarter',
  year: 'This year',
};

type Better = 'up' | 'down';

function Headline({
  label,
  value,
  previous,
  change,
  better,
  explain,
  format,
  changeText,
}: {
  label: string;
  value: number | null;
  previous: number | null;
  change: number | null;
  better: Better;
  explain: string;
  format: (v: number | null) => string;
  changeText: (d: number) => string;
}) {
  const tone = change === null || Math.abs(change) < 1e-9 ? 'same' : change > 0 === (better === 'up') ? 'better' : 'worse';
  const Icon = change === null || tone === 'same' ? Minus : change > 0 ? ArrowUpRight : ArrowDownRight;
  const toneClass = tone === 'better' ? 'text-ok' : tone === 'worse' ? 'text-alarm' : 'text-slate';
  return (
    <section className="flex flex-col gap-1 rounded-lg border border-slate-line bg-white p-4" aria-label={label}>
      <h2 className="text-sm font-medium text-slate">{label}</h2>
      <p className="tabular text-3xl font-semibold">{format(value)}</p>
      <p className={`flex items-center gap-1 text-sm ${toneClass}`}>
        <Icon className="size-4" aria-hidden="true" />
        {change === null ? (
          <span>No comparison (nothing in one of the periods)</span>
        ) : (
          <span>
            {tone === 'same' ? 'Unchanged' : `${changeText(change)} — ${tone}`} <span className="text-slate">(was {format(previous)})</span>
          </span>
        )}
      </p>
      <p className="mt-1 text-xs text-slate">{explain}</p>
    </section>
  );
}

function Headlines({ r }: { r: FixQualityReport }) {
  const pts = (d: number) => `${d > 0 ? 'up' : 'down'} ${Math.abs(d * 100).toFixed(1)} pts`;
  const window = r.windowDays.length ? r.windowDays.join(' or ') : '30';
  return (
    <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
      <Headline
        label="First-time-fix rate"
        value={r.firstTimeFixRate}
        previous={r.previous.firstTimeFixRate}
        change={r.change.firstTimeFixRate}
        better="up"
        format={(v) => formatPercent(v)}
        changeText={pts}
        explain={`${r.firstTimeFixed} of ${r.eligible} service calls were resolved on the first visit with no return visit or callback opened within ${window} days.`}
      />
      <Headline
        label="Callback rate"
        value={r.callbackRate}
        previous={r.previous.callbackRate}
        change={r.change.callbackRate}
        better="down"
        format={(v) => formatPercent(v)}
        changeText={pts}
        explain={`${r.callbacks} of the ${r.resolvedFirstVisits} calls closed as resolved on the first visit had the customer call back within ${window} days.`}
      />
      <Headline
        label="Return visits per service call"
        value={r.returnVisitsPerServiceCall}
        previous={r.previous.returnVisitsPerServiceCall}
        change={r.change.returnVisitsPerServiceCall}
        better="down"
        format={(v) => formatNumber(v, 2)}
        changeText={(d) => `${d > 0 ? 'up' : 'down'} ${Math.abs(d).toFixed(2)}`}
        explain={`${r.returnVisits} return visits were booked for the ${r.eligible} service calls.`}
      />
      <Headline
        label="Average days to resolve"
        value={r.avgDaysToResolve}
        previous={r.previous.avgDaysToResolve}
        change={r.change.avgDaysToResolve}
        better="down"
        format={(v) => (v === null ? '—' : `${formatNumber(v, 1)} d`)}
        changeText={(d) => `${d > 0 ? 'up' : 'down'} ${Math.abs(d).toFixed(1)} d`}
        explain={`From the call being opened to its last visit (follow-ups included) closing resolved; ${r.resolvedJobs} calls ended resolved.`}
      />
    </div>
  );
}

export default function FixQualityPage() {
  const user = useUser();
  const { branchId, branch, timeZone } = useBranch();
  const [params, setParams] = useSearchParams();
  // Presets in UTC calendar dates (the report's period is UTC), defined once in @coilpath/calc.
  const p = useMemo(() => reportPresets(appNow().toISOString().slice(0, 10)), []);
  const from = params.get('from') ?? p.last12.from;
  const to = params.get('to') ?? p.last12.to;
  const active = activePreset(p, { from, to }, params.get('preset') ?? (params.get('from') ? null : 'last12'));
  const prev = from <= to ? previousPeriod({ from, to }) : null;
  const query: PeriodQuery = { from, to, branchId };
  const q = useQuery(reportQuery(query));
  const setPeriod = (f: string, t: string, preset?: ReportPresetKey) =>
    setParams({ from: f, to: t, ...(preset ? { preset } : {}) }, { replace: true });
  const branchName = branch?.name ?? 'All branches';

  return (
    <>
      <PageHeader
        title="Fix Quality"
        subtitle={
          <>
            Where service calls are fixed the first time, where they come back, and why — <strong>{branchName}</strong>, first visits closed{' '}
            {recordDate(from)} to {recordDate(to)} (UTC dates), compared with{' '}
            {prev ? `${recordDate(prev.from)} to ${recordDate(prev.to)}` : 'the previous period'} (as many days, ending the day before).
          </>
        }
        actions={
          <a
            href={pdfUrl(query)}
            download
            className="inline-flex min-h-11 items-center gap-2 rounded-md bg-copper px-4 text-sm font-medium text-white hover:bg-copper-hover"
          >
            <FileDown className="size-4" aria-hidden="true" /> Download report (PDF)
          </a>
        }
      />

      <form
        className="mb-5 flex flex-wrap items-end gap-3 rounded-lg border border-slate-line bg-white p-3"
        aria-label="Period"
        onSubmit={(e) => e.preventDefault()}
      >
        <label className="flex flex-col gap-1 text-sm font-medium" htmlFor="fq-from">
          From
          <input
            id="fq-from"
            type="date"
            className="min-h-11 rounded-md border border-slate-line px-2"
            value={from}
            max={to}
            onChange={(e) => e.target.value && setPeriod(e.target.value, to)}
          />
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium" htmlFor="fq-to">
          To
          <input
            id="fq-to"
            type="date"
            className="min-h-11 rounded-md border border-slate-line px-2"
            value={to}
            min={from}
            onChange={(e) => e.target.value && setPeriod(from, e.target.value)}
          />
        </label>
        <div className="flex flex-wrap gap-2" role="group" aria-label="Quick periods">
          {reportPresetKeys.map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={active === k}
              onClick={() => setPeriod(p[k].from, p[k].to, k)}
              className="min-h-11 rounded-md border border-slate-line px-3 text-sm aria-pressed:border-coolant aria-pressed:bg-coolant-tint aria-pressed:font-medium"
            >
              {presetLabels[k]}
            </button>
          ))}
        </div>
      </form>

      {q.isPending ? (
        <LoadingState label="Counting first-time fixes and callbacks…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : (
        <div className="flex flex-col gap-5">
          <Headlines r={q.data} />
          <p className="rounded-md border border-slate-line bg-white p-3 text-sm" role="status">
            {q.data.pending === 0 ? (
              <>
                No call of this period is still inside its {q.data.windowDays.join(' or ') || 30}-day callback window: every call is
                counted.
              </>
            ) : (
              <>
                <strong className="tabular">{q.data.pending}</strong> {q.data.pending === 1 ? 'call is' : 'calls are'} still inside{' '}
                {q.data.pending === 1 ? 'its' : 'their'} {q.data.windowDays.join(' or ') || 30}-day callback window: a callback may still
                come, so {q.data.pending === 1 ? 'it is' : 'they are'} left out of the rates until the window closes.
              </>
            )}
          </p>
          {q.data.eligible === 0 && q.data.pending === 0 && (
            <p className="rounded-md border border-dashed border-slate-line bg-white p-4 text-sm text-slate">
              No service call had its first visit closed in this period{branchId ? ' in this branch' : ''}. Choose a longer period; the
              figures fill in as technicians close visits.
            </p>
          )}
          <details className="rounded-lg border border-slate-line bg-white p-4 text-sm">
            <summary className="cursor-pointer font-medium">How these figures are counted</summary>
            <ul className="mt-2 list-disc space-y-1 pl-5 text-slate">
              <li>Only service calls count, and only when their first visit was not declined by the customer.</li>
              <li>
                A call counts only once its callback window has run out; until then it is <strong>pending</strong>, shown apart and left out
                of every rate, so a recent period is not flattered by calls that have not had time to come back.
              </li>
              <li>
                A call is <strong>fixed the first time</strong> when its first visit closed as resolved and no return visit or callback was
                opened within the branch’s callback window ({q.data.windowDays.join(' or ') || 30} days) after that visit closed.
              </li>
              <li>
                The <strong>callback rate</strong> is the calls with a callback opened inside the window, out of the calls resolved on the
                first visit.
              </li>
              <li>
                <strong>Days to resolve</strong> run from the call being opened to the close of its last visit, follow-ups included, for
                calls that ended resolved.
              </li>
              <li>
                A call belongs to the period in which its first visit closed (UTC dates); technician, month, cause and origin are those of
                that first visit and its first finding.
              </li>
            </ul>
          </details>

          <div className="flex flex-col gap-5">
            <GroupSection
              title="Trend by month"
              first="Month (UTC)"
              groups={q.data.byMonth}
              csvHref={csvUrl(query, 'byMonth')}
              note="Months are calendar months in UTC, by when the first visit closed. The latest month fills in as callbacks have time to come in."
              chart={<MonthTrendChart months={q.data.byMonth} />}
            />
            {!branchId && (
              <GroupSection
                title="By branch"
                first="Branch"
                groups={q.data.byBranch}
                csvHref={csvUrl(query, 'byBranch')}
                chart={<GroupRateChart groups={q.data.byBranch} title="First-time fix and callbacks by branch" />}
              />
            )}
            <GroupSection
              title="By technician"
              first="Technician (first visit)"
              groups={q.data.byTechnician}
              csvHref={csvUrl(query, 'byTechnician')}
              chart={<GroupRateChart groups={q.data.byTechnician} title="First-time fix and callbacks by technician" />}
            />
            <GroupSection
              title="By make and model"
              first="Make and model"
              groups={q.data.byModel}
              csvHref={csvUrl(query, 'byModel')}
              chart={<GroupRateChart groups={q.data.byModel} title="First-time fix and callbacks by make and model" />}
            />
            <GroupSection
              title="By cause"
              first="Cause (first finding)"
              groups={q.data.byCause}
              csvHref={csvUrl(query, 'byCause')}
              chart={<GroupRateChart groups={q.data.byCause} title="First-time fix and callbacks by cause" />}
            />
            <GroupSection
              title="By cause origin"
              first="Origin"
              groups={q.data.byOrigin}
              csvHref={csvUrl(query, 'byOrigin')}
              chart={<GroupRateChart groups={q.data.byOrigin} title="First-time fix and callbacks by cause origin" />}
            />
          </div>

          <FactoryDefectReviewSection query={query} timeZone={timeZone} />
          <ModelAlertsSection isOwner={user.role === 'owner'} query={query} timeZone={timeZone} />
        </div>
      )}
    </>
  );
}
