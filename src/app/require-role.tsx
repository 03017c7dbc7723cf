import type { ReactNode } from 'react';
import { useOutletContext } from 'react-router-dom';
import { EmptyState } from '../components/ui/page';
import type { Me, Role } from '../features/auth/types';

/** The signed-in user, provided by the app shell. */
export const useCurrentUser = () => useOutletContext<Me>();

/** Shows the page only to the listed roles. The server refuses the data anyway; this keeps the screen honest. */
export function RequireRole({ roles, children }: { roles: Role[]; children: ReactNode }) {
  const me = useCurrentUser();
  if (!roles.includes(me.role)) {
    return <EmptyState title="Not available for your role">This part of Twinframe is for {roles.join(' or ')} accounts. Ask the clinic admin if you need access.</EmptyState>;
  }
  return <>{children}</>;
}
