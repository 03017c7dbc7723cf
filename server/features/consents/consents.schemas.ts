import { z } from 'zod';

const isoDate = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'Not a real date.');

export const withdrawSchema = z
  .object({
    reason: z.string().trim().min(1, 'Enter the reason the patient gave (or "no reason given").').max(1000, 'Use at most 1,000 characters.'),
    /** The day the patient asked; defaults to today in the clinic's time zone. */
    date: isoDate.optional(),
  })
  .strict();

export const acknowledgeFlagsSchema = z
  .object({
    note: z.string().trim().min(1, 'Write a short note on your review of the flagged answers.').max(2000, 'Use at most 2,000 characters.'),
  })
  .strict();

export type WithdrawInput = z.input<typeof withdrawSchema>;
export type AcknowledgeFlagsInput = z.input<typeof acknowledgeFlagsSchema>;
