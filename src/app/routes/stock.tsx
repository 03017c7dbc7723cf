import { StockPage } from '../../features/stock/components/stock-page';
import { UsageReportPage } from '../../features/stock/components/usage-report';
import { RequireRole, useCurrentUser } from '../require-role';

/** The shelf for everyone; receiving and correcting stock for clinicians only (the server checks again). */
export function StockRoute() {
  const me = useCurrentUser();
  return <StockPage canEdit={me.role !== 'coordinator'} />;
}

export const UsageRoute = () => (
  <RequireRole roles={['admin', 'practitioner']}>
    <UsageReportPage />
  </RequireRole>
);
