import { lazy } from 'react';
import type { RouteObject } from 'react-router-dom';
import { RoleGate } from './role-gate';

/**
 * One lazily loaded chunk per screen, so heavy screens (calendar, charts) load only where used.
 * Each area owns its page file under features/<area>/.
 */
const DayPage = lazy(() => import('@/features/day/day-page'));
const VisitPage = lazy(() => import('@/features/visits/visit-page'));
const RosterPage = lazy(() => import('@/features/roster/roster-page'));
const WatchlistPage = lazy(() => import('@/features/watchlist/watchlist-page'));
const AgreementsPage = lazy(() => import('@/features/agreements/agreements-page'));
const UnitPage = lazy(() => import('@/features/units/unit-page'));
const FixQualityPage = lazy(() => import('@/features/fix-quality/fix-quality-page'));
const SitesPage = lazy(() => import('@/features/sites/sites-page'));
const SitePage = lazy(() => import('@/features/sites/site-page'));
const TeamPage = lazy(() => import('@/features/team/team-page'));
const OutboxPage = lazy(() => import('@/features/outbox/outbox-page'));
const ForgotPasswordPage = lazy(() => import('@/features/auth/forgot-password-page'));
const ResetPasswordPage = lazy(() => import('@/features/auth/reset-password-page'));
const AcceptInvitationPage = lazy(() => import('@/features/team/accept-invitation-page'));
const OwnerSetupPage = lazy(() => import('@/features/auth/owner-setup-page'));

const all = ['owner', 'branch_manager', 'dispatcher', 'technician'] as const;

/** Screens inside the signed-in frame. */
export const screenRoutes: RouteObject[] = [
  {
    path: 'day',
    element: (
      <RoleGate roles={['technician']}>
        <DayPage />
      </RoleGate>
    ),
  },
  {
    path: 'visits',
    element: (
      <RoleGate roles={['technician']}>
        <VisitPage />
      </RoleGate>
    ),
  },
  {
    path: 'visits/:id',
    element: (
      <RoleGate roles={all}>
        <VisitPage />
      </RoleGate>
    ),
  },
  {
    path: 'roster',
    element: (
      <RoleGate roles={['dispatcher', 'branch_manager', 'owner']}>
        <RosterPage />
      </RoleGate>
    ),
  },
  {
    path: 'watchlist',
    element: (
      <RoleGate roles={['branch_manager', 'owner']}>
        <WatchlistPage />
      </RoleGate>
    ),
  },
  {
    path: 'agreements',
    element: (
      <RoleGate roles={['branch_manager', 'owner']}>
        <AgreementsPage />
      </RoleGate>
    ),
  },
  {
    path: 'units',
    element: (
      <RoleGate roles={all}>
        <UnitPage />
      </RoleGate>
    ),
  },
  {
    path: 'units/:id',
    element: (
      <RoleGate roles={all}>
        <UnitPage />
      </RoleGate>
    ),
  },
  {
    path: 'fix-quality',
    element: (
      <RoleGate roles={['owner', 'branch_manager']}>
        <FixQualityPage />
      </RoleGate>
    ),
  },
  {
    path: 'sites',
    element: (
      <RoleGate roles={['branch_manager', 'dispatcher', 'owner']}>
        <SitesPage />
      </RoleGate>
    ),
  },
  {
    path: 'sites/:siteId',
    element: (
      <RoleGate roles={['branch_manager', 'dispatcher', 'owner']}>
        <SitePage />
      </RoleGate>
    ),
  },
  {
    path: 'team',
    element: (
      <RoleGate roles={['owner']}>
        <TeamPage />
      </RoleGate>
    ),
  },
  {
    path: 'outbox',
    element: (
      <RoleGate roles={['owner']}>
        <OutboxPage />
      </RoleGate>
    ),
  },
];

/** Pages reachable without a session (password reset, invitation sign-up). */
export const publicRoutes: RouteObject[] = [
  { path: '/forgot-password', element: <ForgotPasswordPage /> },
  { path: '/reset-password', element: <ResetPasswordPage /> },
  { path: '/accept-invitation', element: <AcceptInvitationPage /> },
  { path: '/setup', element: <OwnerSetupPage /> },
];
