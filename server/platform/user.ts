import type { Role } from './roles';

export type Units = 'us' | 'metric';
export type Language = 'en' | 'es';

/** The signed-in user as every resource sees it (loaded by server/people/db.ts). */
export interface User {
  id: string;
  organisationId: string;
  organisationName: string;
  name: string;
  email: string;
  role: Role;
  active: boolean;
  units: Units;
  language: Language;
  lastSignInAt: string | null;
  createdAt: string;
  hasPassword: boolean;
  /** Raised to end every session made before (server/people/passport.ts). */
  sessionVersion: number;
}
