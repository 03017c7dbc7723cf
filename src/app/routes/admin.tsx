import { Link } from 'react-router-dom';
import { Camera, ChevronRight, FileSignature, ShieldCheck, Mail, Megaphone, Package, ScrollText, Settings, UserCog, type LucideIcon } from 'lucide-react';
import { Card } from '../../components/ui/card';
import { PageHeader } from '../../components/ui/page';
import { AccessLogPage } from '../../features/access-log/components/access-log-page';
import { IntegrityPage } from '../../features/integrity/components/integrity-page';
import { ConsentFormsPage } from '../../features/consents/components/consent-forms-page';
import { OutboxPage } from '../../features/consents/components/outbox-page';
import { SettingsPage } from '../../features/settings/components/settings-page';
import { ProductsPage } from '../../features/treatments/components/products-page';
import { ClearanceQueue } from '../../features/showcase/components/clearance-queue';
import { UsersPage } from '../../features/users/components/users-page';
import { RequireRole, useCurrentUser } from '../require-role';

/** The admin area's sections; each feature adds its own entry and route. */
export const ADMIN_SECTIONS: { to: string; label: string; description: string; icon: LucideIcon }[] = [
  { to: '/admin/consent-forms', label: 'Consent forms', description: 'Treatment, photography and showcase consents, the health questionnaire; versions, publish, retire.', icon: FileSignature },
  { to: '/admin/outbox', label: 'Outbox', description: 'E-mails sent to patients: signed copies and confirmations, pending and failed sends.', icon: Mail },
  { to: '/admin/users', label: 'Users', description: 'Staff sign-ins and roles, deactivation, password resets.', icon: UserCog },
  { to: '/admin/integrity', label: 'Record integrity', description: 'Tamper-evident chains of consents, their evidence and the access log: heads, daily digests, check now.', icon: ShieldCheck },
  { to: '/admin/access-log', label: 'Access log', description: 'Who saw or changed what, and when. Filter and export as CSV.', icon: ScrollText },
  { to: '/admin/settings', label: 'Clinic settings', description: 'Clinic name and time zone, automatic sign-out, reminders, retention, watermark.', icon: Settings },
  { to: '/admin/shot-lists', label: 'Shot lists', description: 'The standard views photographed at each visit, their order and positioning hints.', icon: Camera },
  { to: '/admin/products', label: 'Product catalogue', description: 'Fillers (mL) and neuromodulators (U) offered on the treatment record.', icon: Package },
  { to: '/admin/showcase', label: 'Showcase clearance', description: 'Results nominated for marketing: clear, decline, export, and see withdrawals.', icon: Megaphone },
];

export function AdminHome() {
  return (
    <RequireRole roles={['admin']}>
      <PageHeader title="Admin" subtitle="Clinic set-up, records governance and staff access." />
      <div className="grid gap-3 md:grid-cols-2">
        {ADMIN_SECTIONS.map((s) => (
          <Link key={s.to} to={s.to} className="group">
            <Card className="flex h-full items-center gap-4 px-5 py-4 transition-colors group-hover:border-line-strong group-hover:bg-paper-sunk/40">
              <span className="grid size-11 shrink-0 place-items-center rounded-lg bg-paper-sunk text-ink">
                <s.icon className="size-5" aria-hidden />
              </span>
              <span className="min-w-0 flex-1">
                <span className="block font-semibold">{s.label}</span>
                <span className="block text-sm text-ink-muted">{s.description}</span>
              </span>
              <ChevronRight className="size-5 text-ink-faint" aria-hidden />
            </Card>
          </Link>
        ))}
      </div>
    </RequireRole>
  );
}

export function UsersRoute() {
  const me = useCurrentUser();
  return (
    <RequireRole roles={['admin']}>
      <UsersPage currentUserId={me.id} />
    </RequireRole>
  );
}

export const AccessLogRoute = () => (
  <RequireRole roles={['admin']}>
    <AccessLogPage />
  </RequireRole>
);

export const IntegrityRoute = () => (
  <RequireRole roles={['admin']}>
    <IntegrityPage />
  </RequireRole>
);

export const SettingsRoute = () => (
  <RequireRole roles={['admin']}>
    <SettingsPage />
  </RequireRole>
);

export const ConsentFormsRoute = () => (
  <RequireRole roles={['admin']}>
    <ConsentFormsPage />
  </RequireRole>
);

export const OutboxRoute = () => (
  <RequireRole roles={['admin']}>
    <OutboxPage />
  </RequireRole>
);

export const ProductsRoute = () => (
  <RequireRole roles={['admin']}>
    <ProductsPage />
  </RequireRole>
);

export const ShowcaseRoute = () => (
  <RequireRole roles={['admin']}>
    <ClearanceQueue />
  </RequireRole>
);
