import { Badge } from '../../../components/ui/badge';
import { formatDate } from '../../../lib/format';
import type { LotView } from '../types';

/** "Expired", "Expires today", "Expires in 12 days" or "In date": a lot against the clinic day. */
export function LotStatusBadge({ lot }: { lot: Pick<LotView, 'status' | 'expiryDate'> }) {
  const { state, daysLeft } = lot.status;
  if (state === 'expired') return <Badge tone="danger">Expired {formatDate(lot.expiryDate)}</Badge>;
  if (state === 'expires-soon') return <Badge tone="warn">{daysLeft === 0 ? 'Expires today' : `Expires in ${daysLeft} ${daysLeft === 1 ? 'day' : 'days'}`}</Badge>;
  return <Badge tone="done">In date</Badge>;
}

/** Packs with the product's pack size, e.g. "3 × 1 mL" or "2 × 100 Harlowvale units". */
export function packsText(lot: Pick<LotView, 'onHand' | 'packSize' | 'unit' | 'unitLabel'>): string {
  const unit = lot.unit === 'U' ? (lot.unitLabel ?? 'U') : 'mL';
  return lot.packSize ? `${lot.onHand} × ${lot.packSize} ${unit}` : `${lot.onHand} ${lot.onHand === 1 ? 'pack' : 'packs'}`;
}
