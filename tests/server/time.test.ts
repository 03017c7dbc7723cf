import { describe, expect, it } from 'vitest';
import { dayBoundsUtc, dayIn } from '../../server/lib/time.js';

describe('clinic calendar days', () => {
  it('bound a day in the clinic zone, including the 23- and 25-hour days of clock changes', () => {
    // UK summer time starts on the last Sunday of March (29 March 2026) and ends on the last Sunday of October.
    expect(dayBoundsUtc('2026-03-29', 'Europe/London')).toEqual({ start: '2026-03-29T00:00:00.000Z', end: '2026-03-29T23:00:00.000Z' });
    expect(dayBoundsUtc('2026-10-25', 'Europe/London')).toEqual({ start: '2026-10-24T23:00:00.000Z', end: '2026-10-26T00:00:00.000Z' });
    expect(dayBoundsUtc('2026-07-01', 'Pacific/Auckland')).toEqual({ start: '2026-06-30T12:00:00.000Z', end: '2026-07-01T12:00:00.000Z' });
    expect(dayIn('Europe/London', '2026-10-24T23:30:00.000Z')).toBe('2026-10-25');
  });
});
