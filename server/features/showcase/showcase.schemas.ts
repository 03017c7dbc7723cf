import { z } from 'zod';

const CHANNELS = ['clinic-website', 'social-media', 'print', 'professional-education'] as const;

export const createShowcaseRequestSchema = z
  .object({
    viewKey: z.string().min(1).max(40),
    photoIds: z.array(z.string().uuid('Not a valid photo id.')).min(2, 'Choose at least two photos: a pair or a strip.').max(12, 'At most 12 photos in a strip.'),
    channels: z.array(z.enum(CHANNELS, { message: 'Unknown channel.' })).min(1, 'Choose at least one channel.').max(4),
    note: z.string().trim().max(1000).optional(),
  })
  .strict();

export const decisionSchema = z.object({ note: z.string().trim().max(1000).optional() }).strict();
export const declineSchema = z.object({ note: z.string().trim().min(3, 'Say why the request is declined.').max(1000) }).strict();
export const withdrawRequestSchema = z.object({ reason: z.string().trim().min(3, 'Give a reason.').max(1000) }).strict();
export const exportSchema = z.object({ channel: z.enum(CHANNELS, { message: 'Unknown channel.' }) }).strict();
export const queueQuerySchema = z.object({ state: z.enum(['requested', 'cleared', 'declined', 'withdrawn']).optional() }).strict();

export type CreateShowcaseRequestInput = z.infer<typeof createShowcaseRequestSchema>;
export const CHANNEL_LABEL: Record<(typeof CHANNELS)[number], string> = {
  'clinic-website': 'Clinic website',
  'social-media': 'Social media',
  print: 'Print',
  'professional-education': 'Professional education',
};
