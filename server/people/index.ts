/** What server/app.ts mounts and uses from people: sign-in, sessions, accounts and user admin. */
export { sessionApi } from './session-routes';
export { authPages } from './auth-pages';
export { homePages } from './home-pages';
export { accountPages } from './account-pages';
export { userAdminPages } from './user-pages';
export { configurePassport } from './passport';
export { SessionStore } from './session-store';
export { signInLimits } from './sign-in-limits';
