import { z } from 'zod';
import type { User } from './db';

export const signInSchema = z.object({
  email: z.string().trim().min(1, 'Enter your e-mail address.').max(320),
  password: z.string().min(1, 'Enter your password.').max(200),
});

export const preferencesSchema = z
  .object({
    units: z.enum(['us', 'metric']).optional(),
    language: z.enum(['en', 'es']).optional(),
  })
  .strict();

/** The user as GET /api/session shows it (README, "API"). */
export function toSessionUser(user: User) {
  return {
    id: user.id,
    name: user.name,
    email: user.email,
    role: user.role,
    organisation: { id: user.organisationId, name: user.organisationName },
    units: user.units,
    language: user.language,
  };
}
