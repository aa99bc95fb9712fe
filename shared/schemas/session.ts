import { z } from 'zod';

/** The signed-in person as `GET /api/session` and `POST /api/session` return them (API.md). */

export const roleSchema = z.enum(['admin', 'clerk', 'sampler', 'auditor']);
export type Role = z.infer<typeof roleSchema>;

export const unitsSchema = z.enum(['us', 'metric']);
export type Units = z.infer<typeof unitsSchema>;

export const languageSchema = z.enum(['en', 'es']);
export type Language = z.infer<typeof languageSchema>;

export const sessionUserSchema = z.object({
  id: z.string().min(1),
  name: z.string(),
  email: z.string(),
  role: roleSchema,
  organisation: z.object({
    id: z.string().min(1),
    name: z.string(),
  }),
  units: unitsSchema,
  language: languageSchema,
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

/** `GET /api/session` → 200. */
export const sessionResponseSchema = z.object({
  user: sessionUserSchema,
  csrfToken: z.string().min(1),
});
export type SessionResponse = z.infer<typeof sessionResponseSchema>;
