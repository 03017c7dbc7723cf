import { z } from 'zod';

export const VISIT_KIND_VALUES = ['consultation', 'treatment', 'review', 'follow-up'] as const;
export const VISIT_STATUS_VALUES = ['booked', 'in-progress', 'completed', 'cancelled'] as const;

const startsAt = z.iso.datetime({ offset: true, message: 'Use a date and time like 2026-05-01T10:30:00Z.' });

export const createVisitSchema = z
  .object({
    startsAt,
    kind: z.enum(VISIT_KIND_VALUES, { message: 'Choose the kind of visit.' }),
    practitionerId: z.string().uuid('Choose a practitioner.'),
    notes: z.string().max(4000, 'Use at most 4000 characters.').optional(),
  })
  .strict();

export const updateVisitSchema = z
  .object({
    startsAt: startsAt.optional(),
    kind: z.enum(VISIT_KIND_VALUES).optional(),
    status: z.enum(VISIT_STATUS_VALUES).optional(),
    practitionerId: z.string().uuid().optional(),
    notes: z.string().max(4000, 'Use at most 4000 characters.').optional(),
  })
  .strict();

export const clinicDayQuerySchema = z
  .object({ date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.').optional() })
  .strict();

export type CreateVisitInput = z.input<typeof createVisitSchema>;
export type UpdateVisitInput = z.input<typeof updateVisitSchema>;
