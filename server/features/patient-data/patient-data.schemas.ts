import { z } from 'zod';

export const erasePatientSchema = z
  .object({
    /** The patient's full name typed by the admin, as a deliberate confirmation. */
    confirmName: z.string().trim().min(1, "Type the patient's full name to confirm.").max(200),
    reason: z.string().trim().min(3, 'Give the reason for erasure (e.g. the request date and reference).').max(500),
  })
  .strict();

export type ErasePatientInput = z.infer<typeof erasePatientSchema>;
