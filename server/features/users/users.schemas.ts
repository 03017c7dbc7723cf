import { z } from 'zod';

export const ROLE_VALUES = ['admin', 'practitioner', 'coordinator'] as const;

const password = z
  .string()
  .min(12, 'Use at least 12 characters.')
  .max(200, 'Use at most 200 characters.');

export const createUserSchema = z
  .object({
    email: z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254),
    name: z.string().trim().min(1, 'Enter a name.').max(120, 'Use at most 120 characters.'),
    role: z.enum(ROLE_VALUES, { message: 'Choose a role.' }),
    password,
  })
  .strict();

export const updateUserSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter a name.').max(120).optional(),
    role: z.enum(ROLE_VALUES).optional(),
    active: z.boolean().optional(),
  })
  .strict();

export const resetPasswordSchema = z.object({ password }).strict();

export type CreateUserInput = z.infer<typeof createUserSchema>;
export type UpdateUserInput = z.infer<typeof updateUserSchema>;
