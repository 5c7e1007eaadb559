import type { Role } from '@coilpath/contract';
import type { LucideIcon } from 'lucide-react';
import { CalendarRange, ClipboardCheck, Eye, FileSignature, Gauge, MapPinned, Route, Users, Mail, Building2 } from 'lucide-react';

/**
 * The screens of docs/DESIGN.md §3, with the roles that may use them, in the order of the day's work.
 * The API enforces the same rules; this only decides what the navigation shows.
 */
export const screens = [
  { path: '/day', label: 'Route', icon: Route, roles: ['technician'] },
  { path: '/visits', label: 'Visit', icon: ClipboardCheck, roles: ['technician'], navOnly: 'phone' },
  { path: '/roster', label: 'Roster', icon: CalendarRange, roles: ['dispatcher', 'branch_manager', 'owner'] },
  { path: '/watchlist', label: 'Watchlist', icon: Eye, roles: ['branch_manager', 'owner'] },
  { path: '/agreements', label: 'Agreements', icon: FileSignature, roles: ['branch_manager', 'owner'] },
  { path: '/fix-quality', label: 'Fix Quality', icon: Gauge, roles: ['owner', 'branch_manager'] },
  { path: '/sites', label: 'Sites', icon: Building2, roles: ['branch_manager', 'dispatcher', 'owner'] },
  { path: '/units', label: 'Unit file', icon: MapPinned, roles: ['technician'], navOnly: 'phone' },
  { path: '/team', label: 'Team', icon: Users, roles: ['owner'] },
  { path: '/outbox', label: 'Mail outbox', icon: Mail, roles: ['owner'] },
] as const satisfies readonly { path: string; label: string; icon: LucideIcon; roles: readonly Role[]; navOnly?: 'phone' }[];

export type Screen = (typeof screens)[number];

export function screensFor(role: Role): Screen[] {
  return screens.filter((s) => (s.roles as readonly Role[]).includes(role));
}

/** Where a person lands after signing in. */
export function homeFor(role: Role): string {
  return { technician: '/day', dispatcher: '/roster', branch_manager: '/watchlist', owner: '/fix-quality' }[role];
}
