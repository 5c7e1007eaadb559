import { lazy, Suspense, useState } from 'react';
import { QueryClientProvider } from '@tanstack/react-query';
import { PersistQueryClientProvider } from '@tanstack/react-query-persist-client';
import { createBrowserRouter, Navigate, RouterProvider, useLocation } from 'react-router-dom';
import { createQueryClient } from '@/lib/query-client';
import { persistOptions } from '@/lib/query-persist';
import { overlayRestored } from '@/lib/visit-outbox';
import { LoadingState, ErrorState } from '@/components/ui/states';
import { NoticesProvider } from '@/components/ui/notices';
import { SessionProvider, useSessionQuery, useUser } from '@/lib/session';
import { BranchProvider } from '@/lib/branch';
import { homeFor } from '@/lib/screens';
import { RouterErrorElement } from './route-error';
import { publicRoutes, screenRoutes } from './routes';

/** The signed-in frame (navigation, branch switcher) loads after sign-in, not with the sign-in page. */
const AppFrame = lazy(() => import('./layout').then((m) => ({ default: m.AppFrame })));
/** The sign-in page (and react-hook-form with it) loads only where it shows, not with a signed-in screen. */
const SignInPage = lazy(() => import('@/features/auth/sign-in-page').then((m) => ({ default: m.SignInPage })));

function RequireSession() {
  const session = useSessionQuery();
  const location = useLocation();
  if (session.isPending) return <LoadingState label="Opening Coilpath…" />;
  if (session.isError)
    return (
      <div className="p-6">
        <ErrorState error={session.error} onRetry={() => session.refetch()} />
      </div>
    );
  if (!session.data) return <Navigate to="/sign-in" replace state={{ from: location.pathname + location.search }} />;
  return (
    <SessionProvider user={session.data}>
      <BranchProvider>
        <Suspense fallback={<LoadingState label="Opening Coilpath…" />}>
          <AppFrame />
        </Suspense>
      </BranchProvider>
    </SessionProvider>
  );
}

function Home() {
  const user = useUser();
  return <Navigate to={homeFor(user.role)} replace />;
}

function SignInRoute() {
  const session = useSessionQuery();
  if (session.data) return <Navigate to={homeFor(session.data.role)} replace />;
  return <SignInPage />;
}

const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInRoute />, errorElement: <RouterErrorElement /> },
  ...publicRoutes.map((r) => ({ ...r, errorElement: <RouterErrorElement /> })),
  {
    element: <RequireSession />,
    errorElement: <RouterErrorElement />,
    children: [{ index: true, element: <Home /> }, ...screenRoutes, { path: '*', element: <NotFound /> }],
  },
]);

function NotFound() {
  return <ErrorState title="No such page" error={new Error('Check the address, or pick a screen from the navigation.')} />;
}

export function App() {
  const [client] = useState(createQueryClient);
  const [persist] = useState(() => persistOptions(client));
  const app = (
    <NoticesProvider>
      <Suspense fallback={<LoadingState />}>
        <RouterProvider router={router} />
      </Suspense>
    </NoticesProvider>
  );
  // With IndexedDB, what the technician's phone kept is restored before the first query runs.
  return persist ? (
    <PersistQueryClientProvider client={client} persistOptions={persist} onSuccess={() => overlayRestored(client)}>
      {app}
    </PersistQueryClientProvider>
  ) : (
    <QueryClientProvider client={client}>{app}</QueryClientProvider>
  );
}
