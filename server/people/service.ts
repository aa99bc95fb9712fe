/**
 * What people's routes and pages call: users and their one-time tokens. The reads and writes are
 * single queries (server/people/db.ts, tokens-db.ts), so this passes them on.
 */
export {
  countActiveAdmins,
  countUsers,
  emailTaken,
  findUserById,
  findUserForSignIn,
  getUser,
  insertUser,
  listUsers,
  recordSignIn,
  setUserActive,
  setUserPassword,
  setUserPreferences,
  setUserRole,
  type UserListQuery,
} from './db';
export { checkUserToken, spendUserToken, type TokenPurpose } from './tokens-db';
export { DUE_SOON_DAYS, workQueue, type WorkQueue } from './work-queue-db';
