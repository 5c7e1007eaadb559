import { createContext, useCallback, useContext, useMemo, useState, type ReactNode } from 'react';
import { CheckCircle2, AlertTriangle, X } from 'lucide-react';

interface Notice {
  id: number;
  tone: 'ok' | 'alarm';
  text: string;
}

const Ctx = createContext<{ notify(text: string, tone?: Notice['tone']): void } | null>(null);

/** Says what happened after every action, in a polite live region screen readers announce. */
export function NoticesProvider({ children }: { children: ReactNode }) {
  const [items, setItems] = useState<Notice[]>([]);
  const dismiss = useCallback((id: number) => setItems((xs) => xs.filter((x) => x.id !== id)), []);
  const notify = useCallback(
    (text: string, tone: Notice['tone'] = 'ok') => {
      const id = Date.now() + Math.random();
      setItems((xs) => [...xs.slice(-3), { id, tone, text }]);
      window.setTimeout(() => dismiss(id), tone === 'alarm' ? 10_000 : 5_000);
    },
    [dismiss],
  );
  const value = useMemo(() => ({ notify }), [notify]);
  return (
    <Ctx.Provider value={value}>
      {children}
      <div aria-live="polite" className="pointer-events-none fixed inset-x-0 bottom-20 z-50 flex flex-col items-center gap-2 px-3 md:bottom-6 md:items-end md:pr-6">
        {items.map((n) => (
          <div
            key={n.id}
            role={n.tone === 'alarm' ? 'alert' : 'status'}
            className={`pointer-events-auto flex max-w-md items-start gap-2 rounded-md px-4 py-3 text-sm text-white shadow-lg ${n.tone === 'ok' ? 'bg-ink' : 'bg-alarm'}`}
          >
            {n.tone === 'ok' ? <CheckCircle2 className="mt-0.5 size-4 shrink-0" aria-hidden="true" /> : <AlertTriangle className="mt-0.5 size-4 shrink-0" aria-hidden="true" />}
            <span className="flex-1">{n.text}</span>
            <button type="button" onClick={() => dismiss(n.id)} className="-m-1 p-1" aria-label="Dismiss">
              <X className="size-4" aria-hidden="true" />
            </button>
          </div>
        ))}
      </div>
    </Ctx.Provider>
  );
}

export function useNotify() {
  const c = useContext(Ctx);
  if (!c) throw new Error('useNotify outside NoticesProvider');
  return c.notify;
}
