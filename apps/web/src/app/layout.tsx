import { Suspense, useState } from 'react';
import { NavLink, Outlet } from 'react-router-dom';
import { Menu, X } from 'lucide-react';
import { Wordmark } from '@/components/ui/logo';
import { LoadingState } from '@/components/ui/states';
import { OfflineBanner } from '@/components/ui/offline-banner';
import { useUser } from '@/lib/session';
import { useBranch } from '@/lib/branch';
import { screensFor } from '@/lib/screens';
import { useLiveEvents } from '@/lib/live-events';
import { RouteErrorBoundary } from './route-error';
import { UserMenu } from './user-menu';

function BranchSwitcher() {
  const { branches, branchId, setBranchId, canSwitch, branch } = useBranch();
  if (!canSwitch) {
    return branch ? <span className="text-sm text-slate">{branch.name}</span> : null;
  }
  return (
    <label className="flex items-center gap-2 text-sm">
      <span className="text-slate">Branch</span>
      <select
        className="min-h-9 rounded-md border border-slate-line bg-white px-2 text-sm"
        value={branchId ?? ''}
        onChange={(e) => setBranchId(e.target.value || undefined)}
      >
        <option value="">All branches</option>
        {branches.map((b) => (
          <option key={b.id} value={b.id}>
            {b.name}
          </option>
        ))}
      </select>
    </label>
  );
}

export function AppFrame() {
  const user = useUser();
  // The screens update themselves while signed in: one stream per session (lib/live-events.ts).
  useLiveEvents(user.id);
  const [menuOpen, setMenuOpen] = useState(false);
  const items = screensFor(user.role);
  const railItems = items.filter((s) => !('navOnly' in s));
  const isTech = user.role === 'technician';

  const navLink = (s: (typeof items)[number], onClick?: () => void) => (
    <NavLink
      key={s.path}
      to={s.path}
      onClick={onClick}
      className={({ isActive }) =>
        `flex min-h-11 items-center gap-3 rounded-md px-3 text-sm font-medium ${isActive ? 'bg-copper text-white' : 'text-frost/90 hover:bg-ink-soft'}`
      }
    >
      <s.icon className="size-5" aria-hidden="true" />
      {s.label}
    </NavLink>
  );

  return (
    <div className="min-h-dvh md:flex">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:p-2"
      >
        Skip to content
      </a>
      {/* Desktop rail */}
      {/* Sticky, a screen high: the notices take its bottom (components/ui/notices.tsx), where no control of the page can be. */}
      <aside className="hidden w-60 shrink-0 flex-col bg-ink p-3 text-frost md:sticky md:top-0 md:flex md:h-dvh md:overflow-y-auto">
        <div className="mb-6 px-2 pt-2 text-lg text-white">
          <Wordmark />
        </div>
        <nav aria-label="Screens" className="flex flex-col gap-1">
          {railItems.map((s) => navLink(s))}
        </nav>
      </aside>

      {/* Phone drawer for office roles */}
      {menuOpen && (
        <div className="fixed inset-0 z-40 bg-ink/50 md:hidden" onClick={() => setMenuOpen(false)}>
          <nav aria-label="Screens" className="h-full w-64 bg-ink p-3" onClick={(e) => e.stopPropagation()}>
            <div className="mb-4 flex items-center justify-between px-2 pt-2 text-white">
              <Wordmark />
              <button type="button" className="min-h-11 min-w-11 text-white" onClick={() => setMenuOpen(false)} aria-label="Close menu">
                <X className="mx-auto size-5" aria-hidden="true" />
              </button>
            </div>
            <div className="flex flex-col gap-1">{railItems.map((s) => navLink(s, () => setMenuOpen(false)))}</div>
          </nav>
        </div>
      )}

      <div className="flex min-w-0 flex-1 flex-col">
        <header className="sticky top-0 z-30 flex min-h-14 items-center gap-3 border-b border-slate-line bg-white px-3 md:px-6">
          {!isTech && (
            <button type="button" className="min-h-11 min-w-11 md:hidden" onClick={() => setMenuOpen(true)} aria-label="Open menu">
              <Menu className="mx-auto size-5" aria-hidden="true" />
            </button>
          )}
          <span className="md:hidden">
            <Wordmark />
          </span>
          <div className="ml-auto flex items-center gap-3">
            <span className="hidden sm:inline-flex">
              <BranchSwitcher />
            </span>
            <UserMenu user={user} />
          </div>
        </header>
        <OfflineBanner />
        {user.role === 'owner' && (
          <div className="border-b border-slate-line bg-white px-3 py-2 sm:hidden">
            <BranchSwitcher />
          </div>
        )}
        <main
          id="main"
          className={`mx-auto w-full max-w-content flex-1 px-3 pt-5 md:px-6 md:pb-5 ${isTech ? 'pb-[calc(6rem+var(--notice-space,0px))] md:pb-6' : 'pb-[calc(1.25rem+var(--notice-space,0px))]'}`}
        >
          <RouteErrorBoundary>
            <Suspense fallback={<LoadingState />}>
              <Outlet />
            </Suspense>
          </RouteErrorBoundary>
        </main>
        {isTech && (
          <nav
            aria-label="Screens"
            className="fixed inset-x-0 bottom-0 z-30 grid grid-cols-3 border-t border-slate-line bg-white pb-[env(safe-area-inset-bottom)] md:static md:hidden"
          >
            {items.map((s) => (
              <NavLink
                key={s.path}
                to={s.path}
                className={({ isActive }) =>
                  `flex min-h-14 flex-col items-center justify-center gap-0.5 text-xs font-medium ${isActive ? 'text-copper' : 'text-slate'}`
                }
              >
                <s.icon className="size-5" aria-hidden="true" />
                {s.label}
              </NavLink>
            ))}
          </nav>
        )}
      </div>
    </div>
  );
}
