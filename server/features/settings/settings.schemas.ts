import { z } from 'zod';

const isTimeZone = (tz: string) => {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
};

const printable = (max: number) =>
  z
    .string()
    .trim()
    .min(1, 'Enter a value.')
    .max(max, `Use at most ${max} characters.`)
    .refine((s) => !/[\u0000-\u001f\u007f]/.test(s), 'Use printable characters only.');

export const settingsUpdateSchema = z
  .object({
    clinicName: printable(120),
    timeZone: z.string().refine(isTimeZone, 'Not a known time zone (use a name like Europe/London).'),
    idleMinutes: z.number().int().min(2, 'At least 2 minutes.').max(60, 'At most 60 minutes: an unattended tablet must sign out.'),
    sessionHours: z.number().int().min(1, 'At least 1 hour.').max(24, 'At most 24 hours: sign in again at least once a day.'),
    reviewReminderDays: z.number().int().min(14, 'Reviews are usually 2–4 weeks after treatment (14–28 days).').max(28, 'Reviews are usually 2–4 weeks after treatment (14–28 days).'),
    maintenanceReminderMonths: z.number().int().min(3, 'At least 3 months.').max(18, 'At most 18 months.'),
    retentionYears: z.number().int().min(0).max(100),
    watermarkText: printable(80),
    showcaseCaption: printable(120),
    /** Free text, may be empty: where the protocol is kept and whom to call. Never doses. */
    complicationProtocol: z
      .string()
      .trim()
      .max(500, 'Use at most 500 characters.')
      .refine((s) => !/[\u0000-\u0009\u000b-\u001f\u007f]/.test(s), 'Use printable characters only.'),
    prescriberRequired: z.boolean(),
    treatmentCardEmail: z.boolean(),
    toxinMaintenanceMonths: z.number().int().min(2, 'At least 2 months.').max(6, 'At most 6 months: neuromodulator lasts about 3–4 months.'),
  })
  .partial()
  .strict();

export type SettingsUpdate = z.infer<typeof settingsUpdateSchema>;
