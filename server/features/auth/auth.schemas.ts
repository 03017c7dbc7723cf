import { z } from 'zod';

export const loginSchema = z
  .object({
    email: z.string().trim().min(1, 'Enter your e-mail.').max(254),
    password: z.string().min(1, 'Enter your password.').max(200),
  })
  .strict();
export type LoginInput = z.infer<typeof loginSchema>;
