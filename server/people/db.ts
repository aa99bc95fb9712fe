import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Role } from '../platform/roles';
import { inOrganisation, nowIso } from '../platform/scope';
import { rolesAllowed } from '../platform/permissions';
import type { Language, Units, User } from '../platform/user';

export type { Language, Units, User } from '../platform/user';

export interface UserRow {
  id: string;
  organisation_id: string;
  organisation_name: string;
  name: string;
  email: string;
  password_hash: string | null;
  role: Role;
  active: number | boolean;
  units: Units;
  language: Language;
  last_sign_in_at: string | null;
  created_at: string;
  session_version: number | null;
}

const columns = [
  'users.id',
  'users.organisation_id',
  'organisations.name as organisation_name',
  'users.name',
  'users.email',
  'users.password_hash',
  'users.role',
  'users.active',
  'users.units',
  'users.language',
  'users.last_sign_in_at',
  'users.created_at',
  'users.session_version',
];

export function toUser(row: UserRow): User {
  return {
    id: row.id,
    organisationId: row.organisation_id,
    organisationName: row.organisation_name,
    name: row.name,
    email: row.email,
    role: row.role,
    active: Boolean(row.active),
    units: row.units,
    language: row.language,
    lastSignInAt: row.last_sign_in_at,
    createdAt: row.created_at,
    hasPassword: row.password_hash !== null,
    sessionVersion: Number(row.session_version ?? 0),
  };
}

const withOrganisation = (q: Knex.QueryBuilder) =>
  q.join('organisations', 'organisations.id', 'users.organisation_id').select(columns);

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

/**
 * Sign-in and one-time links look a user up before any organisation is known: these two are the
 * only unscoped reads of users, and they return the organisation with the user.
 */
export async function findUserForSignIn(db: Knex, email: string): Promise<(User & { passwordHash: string | null }) | undefined> {
  const row: UserRow | undefined = await withOrganisation(db('users')).where('users.email', normaliseEmail(email)).first();
  return row && { ...toUser(row), passwordHash: row.password_hash };
}

export async function findUserById(db: Knex, id: string): Promise<User | undefined> {
  const row: UserRow | undefined = await withOrganisation(db('users')).where('users.id', id).first();
  return row && toUser(row);
}

export async function getUser(db: Knex, organisationId: string, id: string): Promise<User | undefined> {
  const row: UserRow | undefined = await withOrganisation(inOrganisation(db, 'users', organisationId))
    .where('users.id', id)
    .first();
  return row && toUser(row);
}

export interface UserListQuery {
  q?: string;
  role?: Role;
  active?: boolean;
  sort: 'name' | 'email' | 'role' | 'last_sign_in_at' | 'active';
  dir: 'asc' | 'desc';
}

export async function listUsers(db: Knex, organisationId: string, query: UserListQuery): Promise<User[]> {
  const q = withOrganisation(inOrganisation(db, 'users', organisationId));
  if (query.q) {
    const like = `%${query.q.toLowerCase()}%`;
    q.where((w) => w.whereRaw('lower(users.name) like ?', [like]).orWhere('users.email', 'like', like));
  }
  if (query.role) q.where('users.role', query.role);
  if (query.active !== undefined) q.where('users.active', query.active);
  q.orderBy(`users.${query.sort}`, query.dir).orderBy('users.name', 'asc');
  const rows: UserRow[] = await q;
  return rows.map(toUser);
}

export async function countUsers(db: Knex, organisationId: string): Promise<Record<Role | 'total', number>> {
  const rows: { role: Role; n: number }[] = await inOrganisation(db, 'users', organisationId)
    .where('active', true)
    .select('role')
    .count({ n: '*' })
    .groupBy('role');
  const counts = { admin: 0, clerk: 0, sampler: 0, auditor: 0, total: 0 };
  for (const r of rows) {
    counts[r.role] = Number(r.n);
    counts.total += Number(r.n);
  }
  return counts;
}

export async function insertUser(
  db: Knex,
  organisationId: string,
  user: { name: string; email: string; role: Role; passwordHash?: string | null; units?: Units; language?: Language },
): Promise<string> {
  const id = randomUUID();
  const now = nowIso();
  await db('users').insert({
    id,
    organisation_id: organisationId,
    name: user.name.trim(),
    email: normaliseEmail(user.email),
    password_hash: user.passwordHash ?? null,
    role: user.role,
    active: true,
    units: user.units ?? 'us',
    language: user.language ?? 'en',
    created_at: now,
    updated_at: now,
  });
  return id;
}

export async function emailTaken(db: Knex, email: string): Promise<boolean> {
  // Addresses are unique across organisations: one address signs in to one account.
  return Boolean(await db('users').where('email', normaliseEmail(email)).first('id'));
}

async function updateUser(db: Knex, organisationId: string, id: string, changes: Record<string, unknown>): Promise<boolean> {
  const n = await inOrganisation(db, 'users', organisationId)
    .where('id', id)
    .update({ ...changes, updated_at: nowIso() });
  return n > 0;
}

export const setUserRole = (db: Knex, organisationId: string, id: string, role: Role) =>
  updateUser(db, organisationId, id, { role });

// Each of these raises the session version, which ends every session signed in before (a
// deactivation's too, so a later re-activation does not bring the old sessions back).
const endSessions = (db: Knex) => ({ session_version: db.raw('?? + 1', ['session_version']) });

export const setUserActive = (db: Knex, organisationId: string, id: string, active: boolean) =>
  updateUser(db, organisationId, id, { active, ...(active ? {} : endSessions(db)) });

export const setUserPassword = (db: Knex, organisationId: string, id: string, passwordHash: string) =>
  updateUser(db, organisationId, id, { password_hash: passwordHash, ...endSessions(db) });

export const setUserPreferences = (
  db: Knex,
  organisationId: string,
  id: string,
  prefs: { units: Units; language: Language },
) => updateUser(db, organisationId, id, prefs);

export const recordSignIn = (db: Knex, organisationId: string, id: string) =>
  inOrganisation(db, 'users', organisationId).where('id', id).update({ last_sign_in_at: nowIso() });

export async function countActiveAdmins(db: Knex, organisationId: string): Promise<number> {
  const row = await inOrganisation(db, 'users', organisationId)
    .whereIn('role', rolesAllowed('users.manage'))
    .where({ active: true })
    .count({ n: '*' })
    .first();
  return Number(row?.n ?? 0);
}

/** Active users of the organisation who may be asked to walk a planting, by name: the assign forms' choices. */
export function listAssignableSamplers(db: Knex, organisationId: string): Promise<{ id: string; name: string }[]> {
  return inOrganisation(db, 'users', organisationId).where({ active: true }).whereIn('role', rolesAllowed('walks.assignee')).orderBy('name').select('id', 'name');
}
