import { describe, expect, it } from 'vitest';
import { lotStatus } from '../../server/features/treatments/dates.js';
import { addMonths, dayIn, zonedHourToUtc } from '../../server/lib/time.js';
import { expiryDateSchema, lotNumberSchema } from '../../server/features/treatments/treatments.schemas.js';
import { reminderDueDates } from '../../server/features/reminders/reminders.service.js';

describe('lot expiry on the treatment day', () => {
  it('treats the printed expiry day as the last usable day', () => {
    // Decision: the date on the box is a use-by date, so the lot is usable through that day and expired the day after.
    expect(lotStatus('2025-06-10', '2025-06-10')).toEqual({ state: 'expires-soon', daysLeft: 0 });
    expect(lotStatus('2025-06-10', '2025-06-11')).toEqual({ state: 'expired', daysLeft: -1 });
    expect(lotStatus('2025-06-10', '2025-06-09')).toEqual({ state: 'expires-soon', daysLeft: 1 });
  });

  it('warns within 30 days and not after', () => {
    expect(lotStatus('2025-07-10', '2025-06-10')).toEqual({ state: 'expires-soon', daysLeft: 30 });
    expect(lotStatus('2025-07-11', '2025-06-10')).toEqual({ state: 'ok', daysLeft: 31 });
    expect(lotStatus('2025-07-11', '2025-06-10', 45).state).toBe('expires-soon');
    expect(lotStatus(null, '2025-06-10')).toEqual({ state: 'missing', daysLeft: null });
  });

  it('counts across month, year and leap-day boundaries', () => {
    expect(lotStatus('2025-01-01', '2024-12-31').daysLeft).toBe(1);
    expect(lotStatus('2024-03-01', '2024-02-28').daysLeft).toBe(2);
    // A day with a clock change is still one day.
    expect(lotStatus('2025-03-31', '2025-03-30').daysLeft).toBe(1);
  });

  it("takes the treatment's day in the clinic's time zone", () => {
    // 23:30 UTC on 31 March 2025 is already 1 April in London (BST, UTC+1) but still 31 March in UTC and New York.
    const at = '2025-03-31T23:30:00.000Z';
    expect(dayIn('Europe/London', at)).toBe('2025-04-01');
    expect(dayIn('UTC', at)).toBe('2025-03-31');
    expect(dayIn('America/New_York', at)).toBe('2025-03-31');
    expect(lotStatus('2025-03-31', dayIn('Europe/London', at)).state).toBe('expired');
    expect(lotStatus('2025-03-31', dayIn('UTC', at)).state).toBe('expires-soon');
    // Auckland (UTC+13 in its summer) is a day ahead early in the UTC day.
    expect(dayIn('Pacific/Auckland', '2025-01-14T12:00:00.000Z')).toBe('2025-01-15');
  });
});

describe('what the form accepts', () => {
  it('reads a month-only expiry as the last day of that month', () => {
    // Common practice: a use-by date printed as YYYY-MM means the end of that month.
    expect(expiryDateSchema.parse('2025-02')).toBe('2025-02-28');
    expect(expiryDateSchema.parse('2024-02')).toBe('2024-02-29');
    expect(expiryDateSchema.parse('2025-11-30')).toBe('2025-11-30');
    for (const bad of ['2025-02-30', '2025-13', '2025-00-10', '31/12/2025', '2025-1-5']) expect(expiryDateSchema.safeParse(bad).success).toBe(false);
  });

  it('accepts printable lot numbers and refuses control and invisible characters', () => {
    expect(lotNumberSchema.parse(' LR-24A/0193 ')).toBe('LR-24A/0193');
    expect(lotNumberSchema.parse('Ł0T-ÄB12')).toBe('Ł0T-ÄB12');
    for (const bad of ['AB\t12', 'AB12\r\n', 'AB\u000712', 'AB\u200B12', 'AB\u2028', '\u0000', '   ', 'X'.repeat(41)]) {
      expect(lotNumberSchema.safeParse(bad).success, JSON.stringify(bad)).toBe(false);
    }
  });
});

describe('reminder due dates', () => {
  const base = { reviewDays: 14, maintenanceMonths: 6, reminderHour: 9, timeZone: 'Europe/London', withMaintenance: true };

  it('puts the review 2 weeks and maintenance 6 months after the treatment day', () => {
    // Review at 2–4 weeks and HA lip filler lasting about 6–9 months (FACTS 17, common practice).
    const [review, maintenance] = reminderDueDates('2025-03-03', base);
    expect(review).toEqual({ kind: 'review', dueOn: '2025-03-17', dueAt: '2025-03-17T09:00:00.000Z' });
    // 3 September is in British Summer Time: 09:00 local is 08:00 UTC.
    expect(maintenance).toEqual({ kind: 'maintenance', dueOn: '2025-09-03', dueAt: '2025-09-03T08:00:00.000Z' });
  });

  it('clamps months to the end of a shorter month and honours 4 weeks / 9 months', () => {
    const [review, maintenance] = reminderDueDates('2025-08-31', { ...base, reviewDays: 28, maintenanceMonths: 9 });
    expect(review.dueOn).toBe('2025-09-28');
    expect(maintenance.dueOn).toBe('2026-05-31');
    expect(addMonths('2025-08-31', 6)).toBe('2026-02-28');
    expect(addMonths('2023-08-31', 6)).toBe('2024-02-29');
    expect(reminderDueDates('2025-08-31', { ...base, withMaintenance: false })).toHaveLength(1);
  });

  it('converts the morning hour on clock-change days', () => {
    // Europe/London moved to BST at 01:00 UTC on 30 March 2025 and back at 01:00 UTC on 26 October 2025.
    expect(zonedHourToUtc('2025-03-30', 9, 'Europe/London')).toBe('2025-03-30T08:00:00.000Z');
    expect(zonedHourToUtc('2025-10-26', 9, 'Europe/London')).toBe('2025-10-26T09:00:00.000Z');
    expect(zonedHourToUtc('2025-01-15', 9, 'Pacific/Auckland')).toBe('2025-01-14T20:00:00.000Z');
  });
});
