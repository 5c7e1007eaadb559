import type { ReactNode } from 'react';

/** Every screen: a title that says what it is for, what it shows (branch, date), one primary action. */
export function PageHeader({ title, subtitle, actions }: { title: string; subtitle?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-5 flex flex-wrap items-end justify-between gap-3">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
        {subtitle && <p className="mt-1 text-sm text-slate">{subtitle}</p>}
      </div>
      {actions && <div className="flex flex-wrap items-center gap-2">{actions}</div>}
    </header>
  );
}

export function Card({
  title,
  children,
  className = '',
  actions,
}: {
  title?: ReactNode;
  children: ReactNode;
  className?: string;
  actions?: ReactNode;
}) {
  return (
    <section className={`rounded-lg border border-slate-line bg-white p-4 ${className}`}>
      {(title || actions) && (
        <div className="mb-3 flex items-center justify-between gap-2">
          {title && <h2 className="text-base font-semibold">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}

type Tone = 'neutral' | 'ok' | 'watch' | 'alarm' | 'info' | 'brand';
const tones: Record<Tone, string> = {
  neutral: 'bg-slate-faint text-ink',
  ok: 'bg-ok-tint text-ok',
  watch: 'bg-watch-tint text-watch',
  alarm: 'bg-alarm-tint text-alarm',
  info: 'bg-coolant-tint text-coolant',
  brand: 'bg-copper-tint text-copper-hover',
};

export function Badge({ tone = 'neutral', children, className = '' }: { tone?: Tone; children: ReactNode; className?: string }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded px-2 py-0.5 text-xs font-medium ${tones[tone]} ${className}`}>{children}</span>
  );
}

/** The usual caution where Coilpath computes anything that guides refrigerant, pressure or electrical work. */
export function SafetyNote({ children }: { children?: ReactNode }) {
  return (
    <p role="note" className="rounded-md border border-watch-base/40 bg-watch-tint px-3 py-2 text-sm text-ink">
      <strong className="font-semibold">Caution: </strong>
      {children ??
        'Readings guide diagnosis alongside the manufacturer’s charging data, local codes and licensed practice. Refrigerant work needs the proper EPA 608 certification.'}
    </p>
  );
}
