/** Readings trend per circuit (recharts, loaded only with the Unit file chunk). */
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { UnitFileReading } from '@coilpath/contract';
import { formatInZone } from '@/lib/format';

export function CircuitTrend({ readings, timeZone, circuit }: { readings: UnitFileReading[]; timeZone: string; circuit: number }) {
  const data = readings.map((r) => ({
    t: new Date(r.takenAt).getTime(),
    superheat: r.superheat,
    subcooling: r.subcooling,
    suction: r.suctionPressure,
    discharge: r.dischargePressure ?? r.liquidPressure,
  }));
  const tick = (v: number) => formatInZone(new Date(v), timeZone, 'd MMM yy');
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      <figure aria-label={`Circuit ${circuit}: superheat and subcooling over time`} className="h-56">
        <figcaption className="mb-1 text-xs font-medium text-slate">Superheat and subcooling (°F)</figcaption>
        <ResponsiveContainer width="100%" height="90%">
          <LineChart data={data} margin={{ top: 4, right: 12, bottom: 4, left: 0 }}>
            <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" />
            <XAxis dataKey="t" type="number" scale="time" domain={['dataMin', 'dataMax']} tickFormatter={tick} tick={{ fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} width={40} />
            <Tooltip labelFormatter={(v) => formatInZone(new Date(v as number), timeZone)} formatter={(v) => `${(v as number).toFixed(1)} °F`} />
            <Legend />
            <Line isAnimationActive={false} dataKey="superheat" name="Superheat" stroke="#1F7A8C" strokeWidth={2} dot={{ r: 3 }} connectNulls />
            <Line isAnimationActive={false} dataKey="subcooling" name="Subcooling" stroke="#B5562B" strokeWidth={2} strokeDasharray="6 3" dot={{ r: 3 }} connectNulls />
          </LineChart>
        </ResponsiveContainer>
      </figure>
      <figure aria-label={`Circuit ${circuit}: suction and discharge pressure over time`} className="h-56">
        <figcaption className="mb-1 text-xs font-medium text-slate">Suction and discharge (or liquid) pressure (psig)</figcaption>
        <ResponsiveContainer width="100%" height="90%">
          <LineChart data={data} margin={{ top: 4, right: 12, bottom: 4, left: 0 }}>
            <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" />
            <XAxis dataKey="t" type="number" scale="time" domain={['dataMin', 'dataMax']} tickFormatter={tick} tick={{ fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} width={44} />
            <Tooltip labelFormatter={(v) => formatInZone(new Date(v as number), timeZone)} formatter={(v) => `${(v as number).toFixed(0)} psig`} />
            <Legend />
            <Line isAnimationActive={false} dataKey="suction" name="Suction" stroke="#3F5E8C" strokeWidth={2} dot={{ r: 3 }} connectNulls />
            <Line isAnimationActive={false} dataKey="discharge" name="Discharge / liquid" stroke="#6B4E8E" strokeWidth={2} strokeDasharray="6 3" dot={{ r: 3 }} connectNulls />
          </LineChart>
        </ResponsiveContainer>
      </figure>
    </div>
  );
}
