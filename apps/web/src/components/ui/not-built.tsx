import { PageHeader } from './page';
import { EmptyState } from './states';

/** An honest placeholder for a screen whose work has not landed yet: no invented data. */
export function NotBuiltYet({ title, purpose }: { title: string; purpose: string }) {
  return (
    <>
      <PageHeader title={title} subtitle={purpose} />
      <EmptyState title={`${title} is not available yet`}>
        This screen is part of Coilpath’s plan but has not been built in this version. Nothing here is hidden from you; there is simply
        nothing to show yet.
      </EmptyState>
    </>
  );
}
