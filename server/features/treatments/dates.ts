/** Lot expiry on the day of use. Calendar arithmetic lives in `lib/time.ts`. */
import { daysBetween } from '../../lib/time.js';

export type LotState = 'missing' | 'expired' | 'expires-soon' | 'ok';

export interface LotStatus {
  state: LotState;
  /** Days from the treatment day to the expiry day; 0 when the lot expires that day. */
  daysLeft: number | null;
}

/**
 * A lot's state on the day it is used. The expiry date printed on the box is the last day the product may be used
 * (a use-by date), so a lot whose expiry is the treatment day itself is still usable, with a warning; it is
 * expired from the next day in the clinic's time zone. `soonDays` (default 30) makes a lot "expires soon".
 */
export function lotStatus(expiryDate: string | null | undefined, usedOn: string, soonDays = 30): LotStatus {
  if (!expiryDate) return { state: 'missing', daysLeft: null };
  const daysLeft = daysBetween(usedOn, expiryDate);
  if (daysLeft < 0) return { state: 'expired', daysLeft };
  if (daysLeft <= soonDays) return { state: 'expires-soon', daysLeft };
  return { state: 'ok', daysLeft };
}
