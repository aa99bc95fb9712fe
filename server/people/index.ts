/** What server/app.ts mounts and uses from people: sign-in, sessions, accounts and user admin. */
export { sessionApi } from './session-routes';
export { authPages } from './auth-pages';
export { homePages } from './home-pages';
export { accountPages } from './account-pages';
export { userAdminPages } from './user-pages';
export { configurePassport, sessionUser } from './passport';
export { SessionStore } from './session-store';
export { accessLimits, MemoryAttemptStore, type AttemptStore, type AccessLimits } from './sign-in-limits';
export { DatabaseAttemptStore } from './attempts-db';
