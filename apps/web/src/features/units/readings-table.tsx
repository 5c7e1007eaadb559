import { useState } from 'react';
import { Link } from 'react-router-dom';
import { formatMeasure } from '@coilpath/contract/measure';
import type { MeasureKind, ReadingUnits, UnitFileReading } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { formatInZone } from '@/lib/format';
import { UnitTable } from './unit-table';

const SHOWN = 8;

/**
 * One circuit's readings as numbers, newest first, every value with its unit symbol (the readings
 * state their units: the unit branch's system). The same data as the trend, for reading and for
 * screen readers.
 */
export function ReadingsTable({
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
  const [all, setAll] = useState(false);
  const newest = [...readings].reverse();
  const rows = all ? newest : newest.slice(0, SHOWN);
  const m = (n: number | null, kind: MeasureKind) => (n === null ? '—' : formatMeasure(n, kind, units));
  const head = ['Taken', 'Suction', 'Suction line', 'Superheat', 'Liquid / discharge', 'Liquid line', 'Subcooling', 'Outdoor'];
  return (
    <div className="mt-3">
      <UnitTable
        showCaption
        nowrap
        caption={`Circuit ${circuit} readings, newest first${rows.length < newest.length ? ` (latest ${rows.length} of ${newest.length})` : ''}`}
        head={head}
      >
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
                {r.suctionPressureController !== null && (
                  <span className="block text-xs text-slate">controller {m(r.suctionPressureController, 'pressure')}</span>
                )}
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
      </UnitTable>
      {newest.length > SHOWN && (
        <Button variant="ghost" size="sm" className="mt-1" onClick={() => setAll((x) => !x)} aria-expanded={all}>
          {all ? `Show the latest ${SHOWN}` : `Show all ${newest.length} readings`}
        </Button>
      )}
    </div>
  );
}
