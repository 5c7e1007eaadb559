/**
 * Fix Quality charts (recharts). Kept in this feature so recharts loads only with its lazy page chunk.
 * Every chart sits beside a table with the same numbers, so nothing is shown by colour or shape alone.
 */
import { Bar, BarChart, CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { FixQualityGroup } from '@coilpath/contract';

const pct = (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${(v * 100).toFixed(1)} %`);
const axisPct = (v: number) => `${Math.round(v * 100)} %`;

export function MonthTrendChart({ months }: { months: FixQualityGroup[] }) {
  const data = months.map((m) => ({ month: m.key, ftf: m.firstTimeFixRate, callbacks: m.callbackRate, calls: m.eligible }));
  return (
    <figure aria-label="Trend by month: first-time-fix rate and callback rate" className="h-64 w-full">
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 12, bottom: 4, left: 0 }}>
          <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" />
          <XAxis dataKey="month" tick={{ fontSize: 12 }} />
          <YAxis domain={[0, 1]} tickFormatter={axisPct} tick={{ fontSize: 12 }} width={48} />
          <Tooltip formatter={(v) => pct(v as number)} />
          <Legend />
          <Line
            isAnimationActive={false}
            type="monotone"
            dataKey="ftf"
            name="First-time fix"
            stroke="#2E7D4F"
            strokeWidth={2}
            dot={{ r: 3 }}
            connectNulls
          />
          <Line
            isAnimationActive={false}
            type="monotone"
            dataKey="callbacks"
            name="Callback rate"
            stroke="#B3261E"
            strokeWidth={2}
            strokeDasharray="6 3"
            dot={{ r: 3, strokeDasharray: '' }}
            connectNulls
          />
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}

/** Horizontal bars of the first-time-fix and callback rate per group (top groups by volume). */
export function GroupRateChart({ groups, title, limit = 10 }: { groups: FixQualityGroup[]; title: string; limit?: number }) {
  const data = groups
    .filter((g) => g.eligible > 0)
    .slice(0, limit)
    .map((g) => ({
      label: g.label.length > 26 ? `${g.label.slice(0, 25)}…` : g.label,
      ftf: g.firstTimeFixRate,
      callbacks: g.callbackRate,
    }));
  if (data.length === 0) return null;
  return (
    <figure aria-label={title} className="w-full" style={{ height: 48 + data.length * 44 }}>
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} layout="vertical" margin={{ top: 4, right: 12, bottom: 4, left: 4 }}>
          <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" horizontal={false} />
          <XAxis type="number" domain={[0, 1]} tickFormatter={axisPct} tick={{ fontSize: 12 }} />
          <YAxis type="category" dataKey="label" width={140} tick={{ fontSize: 12 }} />
          <Tooltip formatter={(v) => pct(v as number)} />
          <Legend />
          <Bar isAnimationActive={false} dataKey="ftf" name="First-time fix" fill="#2E7D4F" barSize={12} />
          <Bar isAnimationActive={false} dataKey="callbacks" name="Callback rate" fill="#B3261E" barSize={12} />
        </BarChart>
      </ResponsiveContainer>
    </figure>
  );
}

/** Cost of factory defects per make and model. */
export function DefectCostChart({ models }: { models: { label: string; labour: number; refrigerant: number }[] }) {
  if (models.length === 0) return null;
  return (
    <figure aria-label="Factory-defect cost by make and model" className="w-full" style={{ height: 60 + models.length * 44 }}>
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={models} layout="vertical" margin={{ top: 4, right: 12, bottom: 4, left: 4 }}>
          <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" horizontal={false} />
          <XAxis type="number" tickFormatter={(v: number) => `$${Math.round(v / 100)}`} tick={{ fontSize: 12 }} />
          <YAxis type="category" dataKey="label" width={140} tick={{ fontSize: 12 }} />
          <Tooltip formatter={(v) => `$${((v as number) / 100).toFixed(0)}`} />
          <Legend />
          <Bar isAnimationActive={false} dataKey="labour" name="Labour" stackId="c" fill="#1F7A8C" barSize={14} />
          <Bar isAnimationActive={false} dataKey="refrigerant" name="Refrigerant" stackId="c" fill="#B5562B" barSize={14} />
        </BarChart>
      </ResponsiveContainer>
    </figure>
  );
}
