import { useState, type FormEvent } from 'react';
import { KeyRound, LockOpen, MonitorOff, UserPlus } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useCreateUser, useEndUserSessions, useResetPassword, useUnlockUser, useUpdateUser, useUsers } from '../api/users';
import { ROLE_LABEL, type Role, type StaffUser } from '../types';

function errorsOf(err: unknown): Record<string, string> {
  if (err instanceof ApiError) return { ...err.fieldErrors(), root: err.message };
  return err ? { root: 'Could not save. Check the connection and try again.' } : {};
}

function NewUserForm({ onDone }: { onDone: () => void }) {
  const create = useCreateUser();
  const [v, setV] = useState({ name: '', email: '', role: 'practitioner' as Role, password: '' });
  const errors = errorsOf(create.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(v, { onSuccess: onDone });
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {errors.root && <Notice tone="danger">{errors.root}</Notice>}
      <Field label="Full name" error={errors.name}>
        {(p) => <Input {...p} value={v.name} onChange={(e) => setV({ ...v, name: e.target.value })} />}
      </Field>
      <Field label="E-mail" error={errors.email}>
        {(p) => <Input {...p} type="email" value={v.email} onChange={(e) => setV({ ...v, email: e.target.value })} />}
      </Field>
      <Field label="Role" error={errors.role}>
        {(p) => (
          <Select {...p} value={v.role} onChange={(e) => setV({ ...v, role: e.target.value as Role })}>
            {Object.entries(ROLE_LABEL).map(([k, l]) => (
              <option key={k} value={k}>
                {l}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="First password" error={errors.password} hint="At least 12 characters. Give it to the person in person; they should change it.">
        {(p) => <Input {...p} type="password" autoComplete="new-password" value={v.password} onChange={(e) => setV({ ...v, password: e.target.value })} />}
      </Field>
      <div className="flex justify-end gap-2">
        <Button variant="ghost" onClick={onDone}>
          Cancel
        </Button>
        <Button type="submit" variant="primary" busy={create.isPending}>
          Create user
        </Button>
      </div>
    </form>
  );
}

function ResetPasswordForm({ user, onDone }: { user: StaffUser; onDone: () => void }) {
  const reset = useResetPassword();
  const [password, setPassword] = useState('');
  const errors = errorsOf(reset.error);
  return (
    <form
      noValidate
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        reset.mutate({ id: user.id, password }, { onSuccess: onDone });
      }}
    >
      {errors.root && <Notice tone="danger">{errors.root}</Notice>}
      <p className="text-ink-muted">Set a new password for {user.name}. They are signed out on every device at once.</p>
      <Field label="New password" error={errors.password}>
        {(p) => <Input {...p} type="password" autoComplete="new-password" value={password} onChange={(e) => setPassword(e.target.value)} />}
      </Field>
      <div className="flex justify-end gap-2">
        <Button variant="ghost" onClick={onDone}>
          Cancel
        </Button>
        <Button type="submit" variant="primary" busy={reset.isPending}>
          Set password
        </Button>
      </div>
    </form>
  );
}

export function UsersPage({ currentUserId }: { currentUserId: string }) {
  const { data, isPending, error } = useUsers();
  const update = useUpdateUser();
  const endSessions = useEndUserSessions();
  const unlock = useUnlockUser();
  const [done, setDone] = useState<string | null>(null);
  const [creating, setCreating] = useState(false);
  const [resetting, setResetting] = useState<StaffUser | null>(null);
  return (
    <>
      <PageHeader
        title="Users"
        subtitle="Who can sign in to Twinframe, and with which role."
        actions={
          <Button variant="primary" onClick={() => setCreating(true)}>
            <UserPlus className="size-4" /> New user
          </Button>
        }
      />
      {(error || update.error || endSessions.error || unlock.error) && <Notice tone="danger">{(error ?? update.error ?? endSessions.error ?? unlock.error)?.message}</Notice>}
      {done && <Notice tone="done">{done}</Notice>}
      {isPending ? (
        <Spinner label="Loading users" />
      ) : (
        <Card>
          <ul>
            {data?.map((u) => (
              <li key={u.id} className="flex flex-wrap items-center gap-3 border-b border-line px-5 py-3 last:border-0">
                <div className="min-w-0 flex-1">
                  <p className={u.active ? 'font-medium' : 'font-medium text-ink-faint line-through'}>{u.name}</p>
                  <p className="truncate text-sm text-ink-muted">{u.email}</p>
                </div>
                {!u.active && <Badge tone="warn">Deactivated</Badge>}
                <Select
                  aria-label={`Role of ${u.name}`}
                  className="w-44"
                  value={u.role}
                  disabled={u.id === currentUserId}
                  onChange={(e) => update.mutate({ id: u.id, role: e.target.value as Role })}
                >
                  {Object.entries(ROLE_LABEL).map(([k, l]) => (
                    <option key={k} value={k}>
                      {l}
                    </option>
                  ))}
                </Select>
                <Button size="icon" aria-label={`Reset password of ${u.name}`} title="Reset password" onClick={() => setResetting(u)}>
                  <KeyRound className="size-4" />
                </Button>
                <Button
                  size="icon"
                  aria-label={`Sign ${u.name} out on every device`}
                  title="Sign out on every device"
                  disabled={u.id === currentUserId}
                  onClick={() => endSessions.mutate(u.id, { onSuccess: () => setDone(`${u.name} is signed out on every device.`) })}
                >
                  <MonitorOff className="size-4" />
                </Button>
                <Button
                  size="icon"
                  aria-label={`Lift the sign-in limits of ${u.name}`}
                  title="Lift sign-in limits (after failed sign-ins)"
                  onClick={() => unlock.mutate(u.id, { onSuccess: () => setDone(`${u.name} can sign in again without waiting.`) })}
                >
                  <LockOpen className="size-4" />
                </Button>
                <Button variant={u.active ? 'danger' : 'secondary'} disabled={u.id === currentUserId} onClick={() => update.mutate({ id: u.id, active: !u.active })} className="w-32">
                  {u.active ? 'Deactivate' : 'Reactivate'}
                </Button>
              </li>
            ))}
          </ul>
        </Card>
      )}
      <Dialog open={creating} onClose={() => setCreating(false)} title="New user">
        <NewUserForm onDone={() => setCreating(false)} />
      </Dialog>
      <Dialog open={Boolean(resetting)} onClose={() => setResetting(null)} title="Reset password">
        {resetting && <ResetPasswordForm user={resetting} onDone={() => setResetting(null)} />}
      </Dialog>
    </>
  );
}
