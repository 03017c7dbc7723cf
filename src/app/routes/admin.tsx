import { UsersPage } from '../../features/users/components/users-page';
import { RequireRole, useCurrentUser } from '../require-role';

export function UsersRoute() {
  const me = useCurrentUser();
  return (
    <RequireRole roles={['admin']}>
      <UsersPage currentUserId={me.id} />
    </RequireRole>
  );
}
