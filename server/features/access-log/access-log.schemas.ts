import { z } from 'zod';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.');

export const accessLogQuerySchema = z
  .object({
    userId: z.string().uuid('Not a valid user id.').optional(),
    patientId: z.string().uuid('Not a valid patient id.').optional(),
    action: z.string().trim().max(60).regex(/^[a-z_.-]*$/, 'Use an action name like photo.view.').optional(),
    from: day.optional(),
    to: day.optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The start date is after the end date.', path: ['from'] });

export type AccessLogQuery = z.input<typeof accessLogQuerySchema>;
