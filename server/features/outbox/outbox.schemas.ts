import { z } from 'zod';

export const outboxListQuerySchema = z
  .object({
    state: z.enum(['pending', 'sending', 'sent', 'failed']).optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(50),
  })
  .strict();

export type OutboxListQuery = z.input<typeof outboxListQuerySchema>;
