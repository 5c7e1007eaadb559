import { ArrowDown, ArrowUp, CheckCircle2 } from 'lucide-react';
import type { TargetLine } from '@/lib/target-range';

const icons = { below: ArrowDown, within: CheckCircle2, above: ArrowUp } as const;

/**
 * A circuit's target ranges and where its computed values lie: in words and an icon (never colour alone).
 * Outside the range is amber ("watch"), not red: a target is guidance, the manufacturer's data decides.
 */
export function TargetRangeList({ lines, label, className = '' }: { lines: TargetLine[]; label: string; className?: string }) {
  if (lines.length === 0) return null;
  return (
    <ul aria-label={label} data-testid="target-ranges" className={`flex flex-wrap gap-x-3 gap-y-0.5 text-xs tabular-nums ${className}`}>
      {lines.map((l) => {
        const Icon = l.verdict ? icons[l.verdict] : null;
        const tone = l.verdict === null ? 'text-slate' : l.verdict === 'within' ? 'text-ok' : 'font-semibold text-watch';
        return (
          <li key={l.kind} className={`inline-flex items-center gap-1 ${tone}`}>
            {Icon && <Icon className="size-3.5 shrink-0" aria-hidden="true" />}
            {l.range}
            {l.verdictText && <> · {l.verdictText}</>}
          </li>
        );
      })}
    </ul>
  );
}
