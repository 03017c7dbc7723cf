import { z } from 'zod';
import { expiryDateSchema, lotNumberSchema } from '../treatments/treatments.schemas.js';

/** Reasons a person gives for changing a lot's count by hand; "received" and "used" are written by the app. */
export const ADJUST_REASONS = ['returned', 'discarded', 'counted'] as const;

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.');
const month = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'Use the form YYYY-MM.');

export const receiveLotSchema = z
  .object({
    productId: z.string().uuid('Choose a product.'),
    lotNumber: lotNumberSchema,
    expiryDate: expiryDateSchema,
    /** Packs received: syringes or vials. */
    quantity: z.number().int('Count whole packs (syringes or vials).').min(1, 'Receive at least one pack.').max(1000, 'At most 1000 packs at once.'),
    notes: z.string().max(500, 'Use at most 500 characters.').default(''),
  })
  .strict();

export const adjustLotSchema = z
  .object({
    delta: z
      .number()
      .int('Count whole packs.')
      .min(-1000)
      .max(1000)
      .refine((n) => n !== 0, 'Enter how many packs were added or taken away.'),
    reason: z.enum(ADJUST_REASONS, { message: 'Choose returned, discarded or counted.' }),
    note: z.string().trim().min(3, 'Say why, e.g. "dropped, seal broken".').max(500, 'Use at most 500 characters.'),
  })
  .strict();

export const stockListQuerySchema = z.object({ all: z.enum(['0', '1']).optional(), productId: z.string().uuid().optional() }).strict();
export const stockDayQuerySchema = z.object({ date: day.optional() }).strict();
export const usageQuerySchema = z
  .object({ from: month, to: month })
  .strict()
  .refine((q) => q.from <= q.to, { path: ['to'], message: 'The last month comes after the first.' })
  .refine((q) => monthsBetween(q.from, q.to) < 24, { path: ['to'], message: 'Ask for at most 24 months at a time.' });

export function monthsBetween(from: string, to: string): number {
  const [fy, fm] = from.split('-').map(Number);
  const [ty, tm] = to.split('-').map(Number);
  return (ty - fy) * 12 + (tm - fm);
}

export type ReceiveLotInput = z.input<typeof receiveLotSchema>;
export type AdjustLotInput = z.input<typeof adjustLotSchema>;
