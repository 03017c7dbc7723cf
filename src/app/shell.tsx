import { useEffect, useRef } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { Navigate, NavLink, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { CalendarDays, LogOut, MonitorOff, Package, ShieldCheck, Users, type LucideIcon } from 'lucide-react';
import { Logo } from '../components/ui/logo';
import { Spinner } from '../components/ui/page';
import { onSessionEnded } from '../lib/api-client';
import { cn } from '../lib/cn';
import { authKeys, useLogout, useMe } from '../features/auth/api/auth';
import { useReview } from '../features/compare/api/compare';
import type { Me, Role } from '../features/auth/types';

/** Main navigation; each entry lists the roles that see it (the server checks again). */
export const NAV: { to: string; label: string; icon: LucideIcon; roles: Role[] }[] = [
  { to: '/', label: 'Clinic day', icon: CalendarDays, roles: ['admin', 'practitioner', 'coordinator'] },
  { to: '/patients', label: 'Patients', icon: Users, roles: ['admin', 'practitioner', 'coordinator'] },
  { to: '/stock', label: 'Stock', icon: Package, roles: ['admin', 'practitioner', 'coordinator'] },
  { to: '/admin', label: 'Admin', icon: ShieldCheck, roles: ['admin'] },
];

const ROLE_NAME: Record<Role, string> = { admin: 'Admin', practitioner: 'Practitioner', coordinator: 'Coordinator' };

export function AppShell() {
  const { data: me, isPending } = useMe();
  const location = useLocation();
  const navigate = useNavigate();
  const qc = useQueryClient();
  const logout = useLogout();
  // A reload or the back button during review mode returns to it: the server keeps it in the session.
  const review = useReview(!!me && me.role !== 'coordinator');

  useEffect(
    () =>
      // Inside the shell someone was signed in, so any 401 means their session has ended.
      onSessionEnded(() => {
        qc.clear();
        qc.setQueryData(authKeys.me(), null);
        navigate('/sign-in', { replace: true, state: { from: location.pathname + location.search, reason: 'SESSION_ENDED' } });
      }),
    [qc, navigate, location.pathname, location.search],
  );

  useIdleLogoff(me?.idleMinutes, () => {
    // Leave first: the shell unmounts once signed out, and with it any per-call mutation callbacks.
    navigate('/sign-in', { replace: true, state: { from: location.pathname + location.search, reason: 'SESSION_ENDED' } });
    logout.mutate();
  });

  if (isPending) return <Spinner label="Opening Twinframe" />;
  if (!me) return <Navigate to="/sign-in" replace state={{ from: location.pathname + location.search }} />;
  if (review.data?.active) return <Navigate to="/review" replace />;

  return (
    <div className="min-h-dvh">
      <header className="sticky top-0 z-30 border-b border-line bg-paper/95 backdrop-blur">
        <div className="mx-auto flex h-16 max-w-6xl items-center gap-2 px-4">
          <NavLink to="/" className="mr-2 flex items-center gap-2" aria-label="Twinframe home">
            <Logo className="size-9" />
            <span className="hidden font-display text-xl font-semibold lg:inline">Twinframe</span>
          </NavLink>
          <nav aria-label="Main" className="flex min-w-0 flex-1 items-center gap-1 overflow-x-auto">
            {NAV.filter((n) => n.roles.includes(me.role)).map((n) => (
              <NavLink
                key={n.to}
                to={n.to}
                end={n.to === '/'}
                className={({ isActive }) =>
                  cn('flex min-h-11 shrink-0 items-center gap-2 rounded-lg px-3 text-[15px] font-medium text-ink-muted hover:bg-paper-sunk hover:text-ink', isActive && 'bg-ink text-paper hover:bg-ink hover:text-paper')
                }
              >
                <n.icon className="size-4" aria-hidden />
                {n.label}
              </NavLink>
            ))}
          </nav>
          <UserMenu me={me} onSignOut={(everywhere) => {
              navigate('/sign-in', { replace: true });
              logout.mutate({ everywhere });
            }} busy={logout.isPending} />
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-6">
        <Outlet context={me} />
      </main>
    </div>
  );
}

/** Signs out after the idle time without a touch, click or key, so an unattended tablet shows no patient data. */
export function useIdleLogoff(minutes: number | undefined, onIdle: () => void) {
  const onIdleRef = useRef(onIdle);
  onIdleRef.current = onIdle;
  useEffect(() => {
    if (!minutes) return;
    let timer = window.setTimeout(() => onIdleRef.current(), minutes * 60_000);
    const reset = () => {
      window.clearTimeout(timer);
      timer = window.setTimeout(() => onIdleRef.current(), minutes * 60_000);
    };
    const events = ['pointerdown', 'keydown', 'wheel', 'touchstart'] as const;
    for (const e of events) window.addEventListener(e, reset, { passive: true });
    return () => {
      window.clearTimeout(timer);
      for (const e of events) window.removeEventListener(e, reset);
    };
  }, [minutes]);
}

function UserMenu({ me, onSignOut, busy }: { me: Me; onSignOut: (everywhere: boolean) => void; busy: boolean }) {
  return (
    <div className="flex shrink-0 items-center gap-2">
      <div className="hidden text-right leading-tight md:block">
        <p className="text-sm font-medium">{me.name}</p>
        <p className="text-xs text-ink-faint">{ROLE_NAME[me.role]}</p>
      </div>
      <button
        type="button"
        onClick={() => onSignOut(true)}
        disabled={busy}
        className="flex min-h-11 min-w-11 items-center justify-center rounded-lg text-ink-muted hover:bg-paper-sunk hover:text-ink"
        aria-label="Sign out on every device"
        title="Sign out on every device"
      >
        <MonitorOff className="size-5" aria-hidden />
      </button>
      <button type="button" onClick={() => onSignOut(false)} disabled={busy} className="flex min-h-11 items-center gap-2 rounded-lg px-3 text-ink-muted hover:bg-paper-sunk hover:text-ink" aria-label="Sign out">
        <LogOut className="size-5" aria-hidden />
        <span className="hidden text-sm sm:inline">Sign out</span>
      </button>
    </div>
  );
}
