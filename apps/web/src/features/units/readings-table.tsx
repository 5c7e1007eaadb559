import { useState } from 'react';
import { Link } from 'react-router-dom';
import { formatMeasure, type MeasureKind, type ReadingUnits, type UnitFileReading } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { formatInZone } from '@/lib/format';

const SHOWN = 8;

/**
 * One circuit's readings as numbers, newest first, every value with its unit symbol (the readings
 * state their units: the unit branch's system). The same data as the trend, for reading and for
 * screen readers.
 */
export function ReadingsTable({ readings, timeZone, circuit, units }: { readings: UnitFileReading[]; timeZone: string; circuit: number; units: ReadingUnits }) {
  const [all, setAll] = useState(false);
  const newest = [...readings].reverse();
  const rows = all ? newest : newest.slice(0, SHOWN);
  const m = (n: number | null, kind: MeasureKind) => (n === null ? '—' : formatMeasure(n, kind, units));
  const head = ['Taken', 'Suction', 'Suction line', 'Superheat', 'Liquid / discharge', 'Liquid line', 'Subcooling', 'Outdoor'];
  return (
    <div className="mt-3">
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-sm tabular-nums">
          <caption className="pb-1 text-left text-xs font-medium text-slate">
            Circuit {circuit} readings, newest first{rows.length < newest.length ? ` (latest ${rows.length} of ${newest.length})` : ''}
          </caption>
          <thead className="bg-frost text-left text-xs uppercase tracking-wide text-slate">
            <tr>
              {head.map((h) => (
                <th key={h} scope="col" className="whitespace-nowrap border-b border-slate-line px-2 py-2 font-semibold">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="[&_td]:whitespace-nowrap [&_td]:border-b [&_td]:border-slate-line/60 [&_td]:px-2 [&_td]:py-1.5 [&_td]:align-top">
            {rows.map((r) => {
              const high = r.liquidPressure ?? r.dischargePressure;
              const highController = r.liquidPressure !== null ? r.liquidPressureController : r.dischargePressureController;
              return (
                <tr key={r.id}>
                  <th scope="row" className="whitespace-nowrap border-b border-slate-line/60 px-2 py-1.5 text-left font-normal">
                    <Link className="text-coolant hover:underline" to={`/visits/${r.visitId}`}>
                      {formatInZone(r.takenAt, timeZone, 'd MMM yyyy')}
                    </Link>
                  </th>
                  <td>
                    {m(r.suctionPressure, 'pressure')}
                    {r.suctionPressureController !== null && <span className="block text-xs text-slate">controller {m(r.suctionPressureController, 'pressure')}</span>}
                  </td>
                  <td>{m(r.suctionLineTemp, 'temperature')}</td>
                  <td className="font-medium">{m(r.superheat, 'temperatureDifference')}</td>
                  <td>
                    {m(high, 'pressure')}
                    {r.liquidPressure === null && r.dischargePressure !== null && <span className="text-xs text-slate"> (discharge)</span>}
                    {highController !== null && <span className="block text-xs text-slate">controller {m(highController, 'pressure')}</span>}
                  </td>
                  <td>{m(r.liquidLineTemp, 'temperature')}</td>
                  <td className="font-medium">{m(r.subcooling, 'temperatureDifference')}</td>
                  <td>{m(r.outdoorTemp, 'temperature')}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {newest.length > SHOWN && (
        <Button variant="ghost" size="sm" className="mt-1" onClick={() => setAll((x) => !x)} aria-expanded={all}>
          {all ? `Show the latest ${SHOWN}` : `Show all ${newest.length} readings`}
        </Button>
      )}
    </div>
  );
}
