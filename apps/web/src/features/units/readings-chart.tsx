/** Readings trend per circuit (recharts, loaded only with the Unit file chunk). */
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { formatMeasure, measureSymbol } from '@coilpath/contract/measure';
import type { ReadingUnits, UnitFileReading } from '@coilpath/contract';
import { formatInZone } from '@/lib/format';

/**
 * Superheat/subcooling and suction/discharge pressure over time, in the units the readings state (the
 * unit branch's system): the axis, the caption and every tooltip value carry the unit symbol.
 */
export function CircuitTrend({
  readings,
  timeZone,
  circuit,
  units,
}: {
  readings: UnitFileReading[];
  timeZone: string;
  circuit: number;
  units: ReadingUnits;
}) {
  const data = readings.map((r) => ({
    t: new Date(r.takenAt).getTime(),
    superheat: r.superheat,
    subcooling: r.subcooling,
    suction: r.suctionPressure,
    discharge: r.dischargePressure ?? r.liquidPressure,
  }));
  const tick = (v: number) => formatInZone(new Date(v), timeZone, 'd MMM yy');
  const dT = measureSymbol('temperatureDifference', units);
  const p = measureSymbol('pressure', units);
  const axisLabel = (value: string) => ({
    value,
    angle: -90,
    position: 'insideLeft' as const,
    offset: 10,
    style: { fontSize: 11, fill: '#5B6B7A', textAnchor: 'middle' as const },
  });
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      <figure aria-label={`Circuit ${circuit}: superheat and subcooling over time, in ${dT}`} className="h-56">
        <figcaption className="mb-1 text-xs font-medium text-slate">Superheat and subcooling ({dT})</figcaption>
        <ResponsiveContainer width="100%" height="90%">
          <LineChart data={data} margin={{ top: 4, right: 12, bottom: 4, left: 4 }}>
            <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" />
            <XAxis dataKey="t" type="number" scale="time" domain={['dataMin', 'dataMax']} tickFormatter={tick} tick={{ fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} width={52} label={axisLabel(dT)} />
            <Tooltip
              labelFormatter={(v) => formatInZone(new Date(v as number), timeZone)}
              formatter={(v) => formatMeasure(v as number, 'temperatureDifference', units)}
            />
            <Legend />
            <Line
              isAnimationActive={false}
              dataKey="superheat"
              name="Superheat"
              stroke="#1F7A8C"
              strokeWidth={2}
              dot={{ r: 3 }}
              connectNulls
            />
            <Line
              isAnimationActive={false}
              dataKey="subcooling"
              name="Subcooling"
              stroke="#B5562B"
              strokeWidth={2}
              strokeDasharray="6 3"
              dot={{ r: 3 }}
              connectNulls
            />
          </LineChart>
        </ResponsiveContainer>
      </figure>
      <figure aria-label={`Circuit ${circuit}: suction and discharge pressure over time, in ${p}`} className="h-56">
        <figcaption className="mb-1 text-xs font-medium text-slate">Suction and discharge (or liquid) pressure ({p})</figcaption>
        <ResponsiveContainer width="100%" height="90%">
          <LineChart data={data} margin={{ top: 4, right: 12, bottom: 4, left: 4 }}>
            <CartesianGrid stroke="#D5DDE4" strokeDasharray="3 3" />
            <XAxis dataKey="t" type="number" scale="time" domain={['dataMin', 'dataMax']} tickFormatter={tick} tick={{ fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} width={60} label={axisLabel(p)} />
            <Tooltip
              labelFormatter={(v) => formatInZone(new Date(v as number), timeZone)}
              formatter={(v) => formatMeasure(v as number, 'pressure', units, 0)}
            />
            <Legend />
            <Line isAnimationActive={false} dataKey="suction" name="Suction" stroke="#3F5E8C" strokeWidth={2} dot={{ r: 3 }} connectNulls />
            <Line
              isAnimationActive={false}
              dataKey="discharge"
              name="Discharge / liquid"
              stroke="#6B4E8E"
              strokeWidth={2}
              strokeDasharray="6 3"
              dot={{ r: 3 }}
              connectNulls
            />
          </LineChart>
        </ResponsiveContainer>
      </figure>
    </div>
  );
}
