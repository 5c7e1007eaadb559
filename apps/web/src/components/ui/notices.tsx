import { createContext, useCallback, useContext, useEffect, useLayoutEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { CheckCircle2, AlertTriangle, X } from 'lucide-react';

/** An action a notice offers ("Undo", "Retry"): such a notice stays until it is used or dismissed. */
export interface NoticeAction {
  label: string;
  run(): void;
}

interface Notice {
  id: number;
  tone: 'ok' | 'alarm';
  text: string;
  action?: NoticeAction | undefined;
}

type Notify = (text: string, tone?: Notice['tone'], options?: { action?: NoticeAction }) => void;

const Ctx = createContext<{ notify: Notify } | null>(null);

/** How long a notice without an action stays (alarms longer, to be read); paused while pointed at or focused. */
export const NOTICE_MS = { ok: 5_000, alarm: 10_000 } as const;

/**
 * The CSS variable the layout reserves below the page for the notices shown on a phone, so the end of a
 * form can always be scrolled clear of them.
 */
export const NOTICE_SPACE_VAR = '--notice-space';

function NoticeItem({ n, onDismiss }: { n: Notice; onDismiss(id: number): void }) {
  const [held, setHeld] = useState(false);
  // Leaves on its own unless it offers an action; not while the technician points at it or is on its button.
  useEffect(() => {
    if (n.action || held) return;
    const t = window.setTimeout(() => onDismiss(n.id), NOTICE_MS[n.tone]);
    return () => window.clearTimeout(t);
  }, [n, held, onDismiss]);
  return (
    <div
      role={n.tone === 'alarm' ? 'alert' : 'status'}
      onPointerEnter={() => setHeld(true)}
      onPointerLeave={() => setHeld(false)}
      onFocus={() => setHeld(true)}
      onBlur={() => setHeld(false)}
      className={`pointer-events-auto flex min-h-[57px] w-full items-center gap-2 py-1 pl-4 pr-1 text-sm text-white shadow-lg md:min-h-0 md:rounded-md md:pl-3 md:ring-1 md:ring-frost/50 ${n.tone === 'ok' ? 'bg-ink' : 'bg-alarm'}`}
    >
      {n.tone === 'ok' ? (
        <CheckCircle2 className="size-4 shrink-0" aria-hidden="true" />
      ) : (
        <AlertTriangle className="size-4 shrink-0" aria-hidden="true" />
      )}
      <span className="flex-1 py-2">{n.text}</span>
      {n.action && (
        <button
          type="button"
          onClick={() => {
            n.action!.run();
            onDismiss(n.id);
          }}
          className="min-h-11 shrink-0 rounded-md px-3 font-semibold underline underline-offset-2 focus-visible:outline-2 focus-visible:outline-white"
        >
          {n.action.label}
        </button>
      )}
      <button
        type="button"
        onClick={() => onDismiss(n.id)}
        className="inline-flex min-h-11 min-w-11 shrink-0 items-center justify-center rounded-md focus-visible:outline-2 focus-visible:outline-white"
        aria-label="Dismiss"
      >
        <X className="size-4" aria-hidden="true" />
      </button>
    </div>
  );
}

/**
 * Says what happened after every action, in a polite live region screen readers announce.
 *
 * Where: on a phone (below `md`) the newest notice takes the bottom edge of the screen, over the technician's
 * screen bar (navigation, not a form's control; a notice is at least its 57 px), never over the page's
 * inputs or buttons: the height
 * they take is reserved below the page (`NOTICE_SPACE_VAR`), and a focused field or button they would
 * cover is scrolled clear. From `md` they sit at the bottom of the navigation rail (sticky and a screen high,
 * `app/layout.tsx`), below its links, where no input or button of the page can be at any scroll: over the
 * page's own corner they would hide its controls.
 */
export function NoticesProvider({ children }: { children: ReactNode }) {
  const [items, setItems] = useState<Notice[]>([]);
  const next = useRef(1);
  const stack = useRef<HTMLDivElement>(null);
  const dismiss = useCallback((id: number) => setItems((xs) => xs.filter((x) => x.id !== id)), []);
  const notify = useCallback<Notify>((text, tone = 'ok', options) => {
    const id = next.current++;
    setItems((xs) => [...xs.slice(-2), { id, tone, text, action: options?.action }]);
  }, []);
  const value = useMemo(() => ({ notify }), [notify]);

  useLayoutEffect(() => {
    const el = stack.current;
    if (!el) return;
    const root = document.documentElement;
    const phone = !window.matchMedia?.('(min-width: 48rem)').matches;
    const h = phone && items.length ? el.getBoundingClientRect().height : 0;
    root.style.setProperty(NOTICE_SPACE_VAR, `${Math.ceil(h)}px`);
    if (!h) return;
    // The field or button in use stays in view above the notices.
    const active = document.activeElement;
    if (active instanceof HTMLElement && active !== document.body && !el.contains(active)) {
      const overlap = active.getBoundingClientRect().bottom - el.getBoundingClientRect().top;
      if (overlap > 0) window.scrollBy({ top: overlap + 8 });
    }
  }, [items]);

  return (
    <Ctx.Provider value={value}>
      {children}
      <div
        ref={stack}
        aria-live="polite"
        className="pointer-events-none fixed inset-x-0 bottom-0 z-40 flex flex-col items-stretch pb-[env(safe-area-inset-bottom)] max-md:[&>*:not(:last-child)]:hidden md:bottom-3 md:left-3 md:right-auto md:w-[13.5rem] md:gap-2 md:pb-0"
      >
        {items.map((n) => (
          <NoticeItem key={n.id} n={n} onDismiss={dismiss} />
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
