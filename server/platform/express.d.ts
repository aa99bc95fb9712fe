import type { User as CrowntipUser } from './user';
import type { RequestContext } from './context';

declare global {
  namespace Express {
    // The signed-in user, loaded fresh from the database on every request.
    interface User extends CrowntipUser {}
    interface Request {
      /** Set by lusca: the CSRF token for forms and the X-CSRF-Token header. */
      csrfToken?: () => string;
      /** Who is asking (server/platform/context.ts); read it through contextOf(req). */
      context?: RequestContext;
      /** This request's id in the request log (server/platform/request-log.ts), when it is on. */
      requestId?: string;
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    flash?: { kind: 'info' | 'error'; text: string };
    /** A decline form refused on the field page: shown again beside its box after the redirect. */
    declineForm?: { proposalId: string; reason: string; error: string };
  }
}

export {};
