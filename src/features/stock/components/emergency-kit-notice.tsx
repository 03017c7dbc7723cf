import { LifeBuoy } from 'lucide-react';
import { Link } from 'react-router-dom';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useEmergencyKit } from '../api/stock';

/**
 * The in-date hyaluronidase check on the treatment screen: clinics that give HA filler keep an in-date supply of the
 * reversal agent (FACTS 29, published consensus guidance). It reports the shelf only and gives no doses.
 */
export function EmergencyKitNotice() {
  const { data, error } = useEmergencyKit();
  if (error) return null;
  if (!data) return null;
  const tone = data.state === 'ok' ? 'done' : 'warn';
  const text =
    data.state === 'none'
      ? 'Emergency kit: no in-date hyaluronidase in stock. Check the kit and restock before giving filler.'
      : `Emergency kit: hyaluronidase in date until ${formatDate(data.inDateUntil!)} (${data.vials} ${data.vials === 1 ? 'vial' : 'vials'})${data.state === 'expires-soon' ? ' — order a new lot soon.' : '.'}`;
  return (
    <p
      data-testid="emergency-kit"
      role={tone === 'warn' ? 'alert' : 'status'}
      className={cn('flex items-center gap-2 rounded-lg border px-4 py-2 text-sm', tone === 'done' ? 'border-done/30 bg-done-soft text-done' : 'border-warn/30 bg-warn-soft text-[#6f4507]')}
    >
      <LifeBuoy className="size-4 shrink-0" aria-hidden />
      <span className="flex-1">{text}</span>
      <Link to="/stock" className="underline underline-offset-2">
        Stock
      </Link>
    </p>
  );
}
