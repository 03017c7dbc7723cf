/** Pure calendar arithmetic for lots and reminders. Days are `YYYY-MM-DD` strings in the clinic's time zone. */

const DAY_MS = 86_400_000;

const dayToUtcMs = (day: string): number => Date.parse(`${day}T00:00:00Z`);
const utcMsToDay = (ms: number): string => new Date(ms).toISOString().slice(0, 10);

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: string, to: string): number {
  return Math.round((dayToUtcMs(to) - dayToUtcMs(from)) / DAY_MS);
}

export function addDays(day: string, days: number): string {
  return utcMsToDay(dayToUtcMs(day) + days * DAY_MS);
}

/** Calendar months later; the day is clamped to the month's end (31 August + 6 months = 28 or 29 February). */
export function addMonths(day: string, months: number): string {
  const [y, m, d] = day.split('-').map(Number);
  const target = new Date(Date.UTC(y, m - 1 + months, 1));
  const lastDay = new Date(Date.UTC(target.getUTCFullYear(), target.getUTCMonth() + 1, 0)).getUTCDate();
  target.setUTCDate(Math.min(d, lastDay));
  return utcMsToDay(target.getTime());
}

/** The calendar day of an instant in a time zone. */
export function dayIn(timeZone: string, at: Date | string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(typeof at === 'string' ? new Date(at) : at);
}

function offsetMs(timeZone: string, utcMs: number): number {
  const parts = new Intl.DateTimeFormat('en-US', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  }).formatToParts(new Date(utcMs));
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value);
  return Date.UTC(get('year'), get('month') - 1, get('day'), get('hour'), get('minute'), get('second')) - utcMs;
}

/** The UTC instant of a wall-clock hour on a day in a time zone (e.g. 09:00 in Europe/London), DST included. */
export function zonedHourToUtc(day: string, hour: number, timeZone: string): string {
  const wall = dayToUtcMs(day) + hour * 3_600_000;
  const first = wall - offsetMs(timeZone, wall);
  const second = wall - offsetMs(timeZone, first);
  return new Date(second).toISOString();
}

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
