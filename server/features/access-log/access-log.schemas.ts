import { z } from 'zod';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.');

/** A position in the log: the time and id of an entry, as the API hands it out in `older` and `newer`. */
const cursor = z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z_[0-9a-f-]{36}$/i, 'Not a position in the access log; start from the first page.');

export const accessLogQuerySchema = z
  .object({
    userId: z.string().uuid('Not a valid user id.').optional(),
    patientId: z.string().uuid('Not a valid patient id.').optional(),
    action: z.string().trim().max(60).regex(/^[a-z_.-]*$/, 'Use an action name like photo.view.').optional(),
    from: day.optional(),
    to: day.optional(),
    /** Entries older than this position (the next page down). */
    before: cursor.optional(),
    /** Entries newer than this position (the page above). */
    after: cursor.optional(),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The start date is after the end date.', path: ['from'] })
  .refine((q) => !(q.before && q.after), { message: 'Ask for older or for newer entries, not both.', path: ['before'] });

export type AccessLogQuery = z.input<typeof accessLogQuerySchema>;

/** Exact counts stop here; beyond it the answer says "more than" (a count of a million rows is not worth its time). */
export const ACCESS_LOG_COUNT_CAP = 10_000;
