import { z } from 'zod';

const uuid = z.string().uuid({ message: 'Not a valid id.' });

export const createHandoverSchema = z
  .object({
    patientId: uuid,
    templateIds: z
      .array(uuid)
      .min(1, 'Choose at least one form.')
      .max(8, 'Choose at most 8 forms.')
      .refine((ids) => new Set(ids).size === ids.length, 'A form is chosen twice.'),
    mode: z.enum(['this-device', 'second-device']),
    visitId: uuid.optional(),
  })
  .strict();

export const claimHandoverSchema = z
  .object({
    code: z.string().trim().min(1).max(20).optional(),
    token: z.string().trim().min(1).max(100).optional(),
  })
  .strict()
  .refine((b) => Boolean(b.code) !== Boolean(b.token), 'Enter the code shown by the clinic.');

export const signFormSchema = z
  .object({
    answers: z.record(z.string(), z.string().max(2000, 'Answers are limited to 2,000 characters.')).default({}),
    channels: z.array(z.enum(['clinic-website', 'social-media', 'print', 'professional-education'])).max(4).default([]),
    crop: z.enum(['face', 'lips-only']).optional(),
    signerName: z.string().trim().min(2, 'Type your full name.').max(200, 'Use at most 200 characters.'),
    /** The drawn signature as a PNG data URL. */
    signature: z.string().max(350_000, 'The signature image is too large.'),
  })
  .strict();

export const templateParams = z.object({ templateId: uuid });

export type CreateHandoverInput = z.input<typeof createHandoverSchema>;
export type ClaimHandoverInput = z.input<typeof claimHandoverSchema>;
export type SignFormInput = z.input<typeof signFormSchema>;
