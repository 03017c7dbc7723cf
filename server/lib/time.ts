import { randomUUID } from 'node:crypto';

/** Current time as a UTC ISO string; all stored timestamps use this form. */
export const nowIso = (): string => new Date().toISOString();

export const newId = (): string => randomUUID();

/*
 * Calendar days are `YYYY-MM-DD` strings in the clinic's time zone; instants are UTC ISO strings.
 */

const DAY_MS = 86_400_000;
const dayToUtcMs = (day: string): number => Date.parse(`${day}T00:00:00Z`);
const utcMsToDay = (ms: number): string => new Date(ms).toISOString().slice(0, 10);

/** The calendar day of an instant (default: now) in a time zone. */
export function dayIn(timeZone: string, at: Date | string = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(typeof at === 'string' ? new Date(at) : at);
}

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

/** The zone's offset from UTC at an instant, in ms (positive east of Greenwich). */
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

/** UTC instants [start, end) of a calendar day in a time zone. */
export function dayBoundsUtc(day: string, timeZone: string): { start: string; end: string } {
  return { start: zonedHourToUtc(day, 0, timeZone), end: zonedHourToUtc(addDays(day, 1), 0, timeZone) };
}
