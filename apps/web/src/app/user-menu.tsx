import { useEffect, useId, useRef, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { ChevronDown, CircleUserRound, LogOut, MonitorSmartphone } from 'lucide-react';
import { roleLabels } from '@coilpath/contract/vocabulary';
import type { SessionUser, SignOutEverywhereAnswer } from '@coilpath/contract';
import { api, ApiError, errorMessage } from '@/lib/api-client';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { useNotify } from '@/components/ui/notices';
import type { SignedOutState } from '@/lib/session';

/**
 * The signed-in person's menu in the header: who is signed in, "Sign out" (this browser) and "Sign out
 * everywhere" (every device and browser, after a confirmation). Both end the session on the server.
 */
export function UserMenu({ user }: { user: SessionUser }) {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const notify = useNotify();
  const [open, setOpen] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState<'here' | 'everywhere' | null>(null);
  const [error, setError] = useState<string | null>(null);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const triggerRef = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    if (!open) return;
    const onPointer = (e: PointerEvent) => {
      if (!rootRef.current?.contains(e.target as Node)) setOpen(false);
    };
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'Escape') {
        setOpen(false);
        triggerRef.current?.focus();
      }
    };
    document.addEventListener('pointerdown', onPointer);
    document.addEventListener('keydown', onKey);
    return () => {
      document.removeEventListener('pointerdown', onPointer);
      document.removeEventListener('keydown', onKey);
    };
  }, [open]);

  function leave(state: SignedOutState) {
    qc.clear();
    qc.setQueryData(['session'], null);
    navigate('/sign-in', { replace: true, state });
  }

  async function signOut() {
    setBusy('here');
    try {
      await api.post('/api/auth/sign-out');
      leave({ signedOut: 'here' });
    } catch (e) {
      // Not reached: the session may still be live on the server, so say so rather than pretend.
      notify(`You are still signed in: ${errorMessage(e)}`, 'alarm');
      setBusy(null);
    }
  }

  async function signOutEverywhere() {
    setBusy('everywhere');
    setError(null);
    try {
      const answer = await api.post<SignOutEverywhereAnswer>('/api/auth/sign-out-everywhere');
      leave({ signedOut: 'everywhere', email: answer.email, endedAt: answer.endedAt });
    } catch (e) {
      if (e instanceof ApiError && e.status === 401) {
        leave({ signedOut: 'here' }); // this session had already ended
        return;
      }
      setError(errorMessage(e));
      setBusy(null);
    }
  }

  const item = 'flex min-h-11 w-full items-center gap-3 rounded-md px-3 text-left text-sm hover:bg-slate-faint disabled:opacity-70';

  return (
    <div ref={rootRef} className="relative">
      <button
        ref={triggerRef}
        type="button"
        aria-expanded={open}
        aria-controls={open ? panelId : undefined}
        onClick={() => setOpen((o) => !o)}
        className="inline-flex min-h-11 items-center gap-2 rounded-md px-2 text-sm hover:bg-slate-faint"
      >
        <CircleUserRound className="size-5 text-slate" aria-hidden="true" />
        <span className="hidden text-left leading-tight lg:block">
          <span className="block font-medium">{user.name}</span>
          <span className="block text-xs text-slate">{roleLabels[user.role]}</span>
        </span>
        <span className="lg:hidden">Account</span>
        <ChevronDown className="size-4 text-slate" aria-hidden="true" />
      </button>
      {open && (
        <div
          id={panelId}
          className="absolute right-0 top-full z-40 mt-1 w-72 max-w-[calc(100vw-1.5rem)] rounded-lg border border-slate-line bg-white p-2 text-ink shadow-lg"
        >
          <div className="px-3 py-2">
            <p className="font-medium">{user.name}</p>
            <p className="break-all text-xs text-slate">{user.email}</p>
            <p className="text-xs text-slate">{roleLabels[user.role]}</p>
          </div>
          <div className="my-1 border-t border-slate-line" />
          <button type="button" className={item} onClick={signOut} disabled={busy !== null} aria-busy={busy === 'here' || undefined}>
            <LogOut className="size-4 shrink-0" aria-hidden="true" />
            <span>Sign out</span>
          </button>
          <button
            type="button"
            className={item}
            onClick={() => {
              setOpen(false);
              setError(null);
              setConfirming(true);
            }}
            disabled={busy !== null}
          >
            <MonitorSmartphone className="size-4 shrink-0" aria-hidden="true" />
            <span>Sign out everywhere…</span>
          </button>
        </div>
      )}
      <Dialog
        open={confirming}
        onClose={() => {
          if (busy === null) setConfirming(false);
        }}
        title="Sign out everywhere?"
        description={`Every session of ${user.email} ends now.`}
      >
        <div className="flex flex-col gap-4 text-sm">
          <p>
            This browser, your phone and any other computer where you are signed in will need your password to sign in again. Use it if you
            signed in on a shared or lost device.
          </p>
          {error && (
            <p role="alert" className="rounded-md bg-alarm-tint px-3 py-2 text-alarm">
              Nothing was signed out: {error}
            </p>
          )}
          <div className="flex flex-wrap justify-end gap-2">
            <Button variant="secondary" onClick={() => setConfirming(false)} disabled={busy !== null}>
              Cancel
            </Button>
            <Button variant="danger" onClick={signOutEverywhere} busy={busy === 'everywhere'}>
              Sign out everywhere
            </Button>
          </div>
        </div>
      </Dialog>
    </div>
  );
}
