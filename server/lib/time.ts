import { randomUUID } from 'node:crypto';

/** Current time as a UTC ISO string; all stored timestamps use this form. */
export const nowIso = (): string => new Date().toISOString();

export const newId = (): string => randomUUID();

/** Today's date (YYYY-MM-DD) in the given IANA time zone. */
export function todayIn(timeZone: string, at: Date = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}

/** UTC instants [start, end) of a calendar day in a time zone. */
export function dayBoundsUtc(day: string, timeZone: string): { start: string; end: string } {
  const offsetAt = (utcMs: number) => {
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
    const asUtc = Date.UTC(get('year'), get('month') - 1, get('day'), get('hour'), get('minute'), get('second'));
    return asUtc - utcMs;
  };
  const localMidnight = (d: string) => {
    const guess = Date.parse(`${d}T00:00:00Z`);
    return guess - offsetAt(guess - offsetAt(guess));
  };
  const next = new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
  return { start: new Date(localMidnight(day)).toISOString(), end: new Date(localMidnight(next)).toISOString() };
}
