import { z } from 'zod';

const isoDate = /^\d{4}-\d{2}-\d{2}$/;

const dateOfBirth = z
  .string()
  .regex(isoDate, 'Use the form YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'Not a real date.')
  .refine((s) => s <= new Date().toISOString().slice(0, 10), 'Date of birth cannot be in the future.')
  .refine((s) => s >= '1900-01-01', 'Date of birth is too far in the past.');

const optionalText = (max: number, message?: string) =>
  z
    .string()
    .trim()
    .max(max, message ?? `Use at most ${max} characters.`)
    .transform((s) => (s === '' ? null : s))
    .nullable()
    .optional();

export const patientInputSchema = z
  .object({
    firstName: z.string().trim().min(1, 'Enter a first name.').max(80, 'Use at most 80 characters.'),
    lastName: z.string().trim().min(1, 'Enter a last name.').max(80, 'Use at most 80 characters.'),
    dateOfBirth,
    email: z
      .union([z.literal(''), z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254)])
      .transform((s) => (s === '' ? null : s))
      .nullable()
      .optional(),
    phone: optionalText(40).refine((s) => s == null || /^[+0-9 ()-]{5,40}$/.test(s), 'Use digits, spaces, +, ( ) and - only.'),
  })
  .strict();

export const patientUpdateSchema = patientInputSchema.partial().extend({ archived: z.boolean().optional() }).strict();

export const patientListQuerySchema = z
  .object({
    q: z.string().trim().max(100).optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(20),
    archived: z.enum(['0', '1']).optional(),
  })
  .strict();

export type PatientInput = z.input<typeof patientInputSchema>;
export type PatientUpdate = z.input<typeof patientUpdateSchema>;
export type PatientListQuery = z.input<typeof patientListQuerySchema>;
