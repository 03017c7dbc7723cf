import { Link } from 'react-router-dom';
import { Card, CardHeader } from '../../../components/ui/card';
import { useStockAlerts } from '../api/stock';
import { LotStatusBadge, packsText } from './stock-status';

/** Lots on the shelf that are expired or expire soon, for the clinic day. Nothing is shown when all is in date. */
export function StockAlertsCard({ date }: { date: string }) {
  const { data } = useStockAlerts(date);
  if (!data || (!data.expired.length && !data.expiringSoon.length)) return null;
  const lots = [...data.expired, ...data.expiringSoon];
  return (
    <Card aria-label="Stock to check" className="mt-4">
      <CardHeader title="Stock to check" action={<Link to="/stock" className="text-sm underline underline-offset-2">Open stock</Link>} />
      <ul className="divide-y divide-line">
        {lots.map((l) => (
          <li key={l.id} className="flex flex-wrap items-center justify-between gap-2 px-5 py-2.5 text-[15px]">
            <span className="min-w-0">
              <span className="font-medium">{l.productName}</span> <span className="font-mono text-sm text-ink-muted">lot {l.lotNumber}</span>
              <span className="ml-2 text-sm text-ink-muted">{packsText(l)}</span>
            </span>
            <LotStatusBadge lot={l} />
          </li>
        ))}
      </ul>
      {data.expired.length > 0 && <p className="border-t border-line px-5 py-2 text-sm text-danger">An expired product must not be used: take it off the shelf and record it as discarded.</p>}
    </Card>
  );
}
