import type { ReactNode } from 'react';
import type { Role } from '@coilpath/contract';
import { ErrorState } from '@/components/ui/states';
import { useUser } from '@/lib/session';

/** A screen the role may not use says so, rather than showing an empty page. The API refuses too. */
export function RoleGate({ roles, children }: { roles: readonly Role[]; children: ReactNode }) {
  const user = useUser();
  if (!roles.includes(user.role)) {
    return (
      <ErrorState
        title="Not available to your role"
        error={new Error('This screen belongs to another role. Use the navigation to reach your own screens.')}
      />
    );
  }
  return <>{children}</>;
}
