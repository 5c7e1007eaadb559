import { useState } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { circuitTargetsInputSchema } from '@coilpath/contract/sites';
import { formatMeasure, readingUnitsBySystem } from '@coilpath/contract/measure';
import { targetRangeCaution } from '@coilpath/contract/target-range';
import type { CircuitTargets, UnitFile, UnitSystem } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { SafetyNote } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { api, ApiError, errorMessage } from '@/lib/api-client';
import { targetLines } from '@/lib/target-range';

type Circuit = UnitFile['circuits'][number];

/** "Target superheat 8.0–12.0 °F; subcooling …", or that none is set. */
function TargetsText({ targets, system }: { targets: CircuitTargets; system: UnitSystem }) {
  const units = readingUnitsBySystem[system];
  const lines = targetLines(targets, units.temperature, {}, units);
  if (lines.length === 0) return <span className="text-slate">No target ranges set.</span>;
  return (
    <>
      {lines.map((l) => l.range).join('; ')}
      {targets.source && <span className="text-slate"> — from {targets.source}</span>}
    </>
  );
}

const fieldValue = (n: number | undefined) => (n === undefined ? '' : String(n));

/** The office's form for one circuit's target ranges (in the branch's units); blank a range to clear it. */
function TargetsForm({ unitId, circuit, system, onDone }: { unitId: string; circuit: Circuit; system: UnitSystem; onDone: () => void }) {
  const qc = useQueryClient();
  const notify = useNotify();
  const temperature = readingUnitsBySystem[system].temperature;
  const symbol = formatMeasure(0, 'temperatureDifference', readingUnitsBySystem[system]).split(' ')[1];
  const t = circuit.targets;
  const [v, setV] = useState({
    superheatMin: fieldValue(t.superheat?.min),
    superheatMax: fieldValue(t.superheat?.max),
    subcoolingMin: fieldValue(t.subcooling?.min),
    subcoolingMax: fieldValue(t.subcooling?.max),
    source: t.source ?? '',
  });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const save = useMutation({
    mutationFn: (body: unknown) =>
      api.put(`/api/units/${unitId}/circuits/${circuit.number}/targets`, body, { check: 'circuitTargetsResultSchema' }),
    onSuccess: async () => {
      notify(`Target ranges saved for circuit ${circuit.number}.`);
      await qc.invalidateQueries({ queryKey: ['units', 'file', unitId] });
      onDone();
    },
    onError: (e) => {
      if (e instanceof ApiError) setErrors(e.fieldErrors);
      notify(`Target ranges not saved: ${errorMessage(e)}`, 'alarm');
    },
  });
  const submit = () => {
    const body = { temperature, ...v };
    const parsed = circuitTargetsInputSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    save.mutate(body);
  };
  const field = (key: keyof typeof v, label: string) => (
    <TextField
      label={label}
      inputMode={key === 'source' ? undefined : 'decimal'}
      value={v[key]}
      error={errors[key]}
      onChange={(e) => setV((s) => ({ ...s, [key]: e.target.value }))}
    />
  );
  return (
    <form
      aria-label={`Target ranges, circuit ${circuit.number}`}
      className="mt-2 flex flex-col gap-3 rounded-md border border-slate-line p-3"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
    >
      <div className="grid grid-cols-2 gap-3">
        {field('superheatMin', `Superheat from (${symbol})`)}
        {field('superheatMax', `Superheat to (${symbol})`)}
        {field('subcoolingMin', `Subcooling from (${symbol})`)}
        {field('subcoolingMax', `Subcooling to (${symbol})`)}
      </div>
      {field('source', 'Source (nameplate, installation manual…)')}
      <p className="text-xs text-slate">Leave both ends of a range blank to clear it.</p>
      <div className="flex gap-2">
        <Button type="submit" disabled={save.isPending}>
          Save target ranges
        </Button>
        <Button type="button" variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/**
 * The Unit file's circuits with their target superheat and subcooling ranges; the office (owner, managers,
 * dispatchers) sets them here. The Visit screen's sticky bar and the Route briefing compare against them.
 */
export function CircuitTargetsList({ file, canEdit }: { file: UnitFile; canEdit: boolean }) {
  const [editing, setEditing] = useState<number | null>(null);
  const any = file.circuits.some((c) => c.targets.superheat || c.targets.subcooling);
  return (
    <div className="mb-3 flex flex-col gap-2 text-sm">
      <ul className="flex flex-col gap-2">
        {file.circuits.map((c) => (
          <li key={c.id}>
            <span className="font-medium">Circuit {c.number}</span>: {c.compressorCount} compressor{c.compressorCount === 1 ? '' : 's'}
            {c.chargeLb ? `, ${c.chargeLb.toFixed(1)} lb` : ''}
            <br />
            <span className="text-xs">
              <TargetsText targets={c.targets} system={file.branch.unitSystem} />
            </span>
            {canEdit && editing !== c.number && (
              <div>
                <Button size="sm" variant="secondary" onClick={() => setEditing(c.number)}>
                  Set target ranges<span className="sr-only">, circuit {c.number}</span>
                </Button>
              </div>
            )}
            {canEdit && editing === c.number && (
              <TargetsForm unitId={file.unit.id} circuit={c} system={file.branch.unitSystem} onDone={() => setEditing(null)} />
            )}
          </li>
        ))}
      </ul>
      {any && <SafetyNote>{targetRangeCaution}</SafetyNote>}
    </div>
  );
}
