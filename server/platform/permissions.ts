import type { RequestHandler } from 'express';
import { HttpError } from './errors';
import { ROLES, type Role } from './roles';

/**
 * Who may do what: every action the server checks, and the roles that hold it. This is the only
 * place in server/ that names roles; routes guard with `can('walks.review')`, handlers ask the
 * request context (`contextOf(req).can(...)`). README "Who does what" prints this table (a test in
 * tests/server/platform/permissions.test.ts keeps the two the same).
 */
export const PERMISSIONS = {
  /** The office pages and dashboard. */
  'office.use': ['admin', 'clerk', 'auditor'],
  /** The phone app under /capture. */
  'capture.use': ['admin', 'clerk', 'sampler'],
  /** Ranches, fields, plantings and the crop list. */
  'registry.read': ['admin', 'clerk', 'sampler', 'auditor'],
  /** Create and change ranches, fields and plantings; import registry CSV files. */
  'registry.write': ['admin', 'clerk'],
  /** Send a boundary traced on the phone for the office to accept (clerks and admins accept with registry.write). */
  'boundaries.propose': ['admin', 'clerk', 'sampler'],
  /** The registry's change history. */
  'history.read': ['admin', 'clerk', 'auditor'],
  /** Read walks: the office reads every walk, others only those they may see. */
  'walks.read': ['admin', 'clerk', 'sampler', 'auditor'],
  /** Read every walk of the organisation (a sampler reads their own and their assigned plantings'). */
  'walks.readAll': ['admin', 'clerk', 'auditor'],
  /** Record walks, add photos, submit. */
  'walks.create': ['admin', 'clerk', 'sampler'],
  /** Approve or reject a submitted walk; change anyone's walk. */
  'walks.review': ['admin', 'clerk'],
  /** Let the person who walked a field review that one walk themselves, with a reason (a one-person office). */
  'walks.waiveOwnReview': ['admin'],
  /** Enter or clear a walk's lab tissue N % (information beside the verdict, any walk status). */
  'walks.tissueN': ['admin', 'clerk'],
  /** Ask a sampler to walk a planting, or take the request back. */
  'walks.assign': ['admin', 'clerk'],
  /** May be asked to walk a planting, and gets the sampling reminders. */
  'walks.assignee': ['sampler'],
  /** The current credit rule. */
  'rules.read': ['admin', 'clerk', 'sampler', 'auditor'],
  /** Earlier versions of the credit rule. */
  'rules.history': ['admin', 'clerk', 'auditor'],
  /** Save a new version of the credit rule. */
  'rules.manage': ['admin'],
  /** Published and retired calibrations, their tables and assignments. */
  'calibrations.read': ['admin', 'clerk', 'sampler', 'auditor'],
  /** Fit and compare calibration data without saving. */
  'calibrations.fit': ['admin', 'clerk'],
  /** Upload, draft, publish, retire and assign calibrations; see drafts. */
  'calibrations.publish': ['admin'],
  /** Credit registers: drafts, versions, CSV and PDF. */
  'registers.read': ['admin', 'clerk', 'auditor'],
  /** Finalise (and amend) a register, send it to the grower. */
  'registers.finalise': ['admin', 'clerk'],
  /** Invite users, change roles, deactivate, send reset links. */
  'users.manage': ['admin'],
  /** The outbox of e-mail the server sent or captured. */
  'mail.outbox': ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;
export const ACTIONS = Object.keys(PERMISSIONS) as Action[];

/** True when the role holds the action. */
export function allows(role: Role, action: Action): boolean {
  return (PERMISSIONS[action] as readonly Role[]).includes(role);
}

/** The roles that hold an action, in the order of ROLES (for queries such as "every active admin"). */
export function rolesAllowed(action: Action): Role[] {
  return ROLES.filter((role) => allows(role, action));
}

/** What views call as `can('action')`: the signed-in role's permissions, nothing when signed out. */
export function viewPermissions(role: Role | undefined): (action: Action) => boolean {
  return (action) => role !== undefined && allows(role, action);
}

/** The role an invitation starts with. */
export const DEFAULT_INVITE_ROLE: Role = 'sampler';

/** Where a role lands after signing in: the office if it may use it, else the capture app. */
export function homeFor(role: Role): string {
  return allows(role, 'office.use') ? '/office' : '/capture';
}

/** Signed in with an active account; 401 for the API, a trip to the sign-in page for pages. */
export const signedIn: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new HttpError('unauthenticated');
  next();
};

/** Route guard: signed in, and the user's role holds the action; checked on the server for every guarded route. */
export function can(action: Action): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) throw new HttpError('unauthenticated');
    if (!allows(req.user.role, action)) throw new HttpError('forbidden');
    next();
  };
}

/** The role matrix as a Markdown table (README "Who does what" carries a copy). */
export function permissionsTable(): string {
  const head = `| action | ${ROLES.join(' | ')} |`;
  const rule = `| --- |${ROLES.map(() => ' :-: |').join('')}`;
  const rows = ACTIONS.map((action) => `| \`${action}\` | ${ROLES.map((role) => (allows(role, action) ? 'yes' : 'no')).join(' | ')} |`);
  return [head, rule, ...rows].join('\n');
}
