import { Router } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { allows, can, DEFAULT_INVITE_ROLE } from '../platform/permissions';
import { ROLES } from '../platform/roles';
import { HttpError } from '../platform/errors';
import { parseForm } from '../platform/validation';
import {
  countActiveAdmins,
  emailTaken,
  getUser,
  insertUser,
  listUsers,
  setUserActive,
  setUserRole,
  type UserListQuery,
} from './service';
import { sendInvitation, sendPasswordResetLink } from './account-links';

const listQuery = z.object({
  q: z.string().trim().max(100).optional().catch(undefined),
  role: z.enum(ROLES).optional().catch(undefined),
  status: z.enum(['active', 'inactive', 'all']).default('all').catch('all'),
  sort: z.enum(['name', 'email', 'role', 'last_sign_in_at', 'active']).default('name').catch('name'),
  dir: z.enum(['asc', 'desc']).default('asc').catch('asc'),
});

const inviteForm = z.object({
  name: z.string().trim().min(1, 'Enter the person’s name.').max(200),
  email: z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(320),
  role: z.enum(ROLES, { message: 'Choose a role.' }),
});

const roleForm = z.object({ role: z.enum(ROLES, { message: 'Choose a role.' }) });
const activeForm = z.object({ active: z.enum(['true', 'false']).transform((v) => v === 'true') });

/** Admin only: the organisation's users, invitations, roles and deactivation. */
export function userAdminPages(ctx: AppContext): Router {
  const router = Router();
  router.use(can('users.manage'));

  router.get('/', async (req, res) => {
    const query = listQuery.parse(req.query);
    const listArgs: UserListQuery = {
      q: query.q || undefined,
      role: query.role,
      active: query.status === 'all' ? undefined : query.status === 'active',
      sort: query.sort,
      dir: query.dir,
    };
    const users = await listUsers(ctx.db, contextOf(req).organisationId, listArgs);
    res.render('admin/users', { title: 'Users', users, query, roles: ROLES });
  });

  router.get('/invite', (_req, res) => {
    res.render('admin/invite', { title: 'Invite a user', values: { role: DEFAULT_INVITE_ROLE }, errors: {}, roles: ROLES });
  });

  router.post('/invite', async (req, res) => {
    const parsed = parseForm(inviteForm, req.body);
    const errors = parsed.ok ? {} : parsed.errors;
    if (parsed.ok && (await emailTaken(ctx.db, parsed.value.email))) {
      errors.email = 'This address already has a Crowntip account.';
    }
    if (!parsed.ok || Object.keys(errors).length) {
      res.status(400).render('admin/invite', { title: 'Invite a user', values: req.body ?? {}, errors, roles: ROLES });
      return;
    }
    const admin = contextOf(req).user;
    const id = await insertUser(ctx.db, admin.organisationId, { ...parsed.value, passwordHash: null });
    await sendInvitation(ctx, { id, ...parsed.value, organisationId: admin.organisationId }, admin);
    req.session.flash = { kind: 'info', text: `Invitation sent to ${parsed.value.email}.` };
    res.redirect('/admin/users');
  });

  const loadTarget = async (orgId: string, id: string) => {
    const target = await getUser(ctx.db, orgId, id);
    if (!target) throw new HttpError('not_found');
    return target;
  };

  router.post('/:id/role', async (req, res) => {
    const admin = contextOf(req).user;
    const target = await loadTarget(admin.organisationId, req.params.id);
    const parsed = parseForm(roleForm, req.body);
    if (!parsed.ok) throw new HttpError('invalid', 'Choose a role.', parsed.errors);
    if (allows(target.role, 'users.manage') && !allows(parsed.value.role, 'users.manage') && (await countActiveAdmins(ctx.db, admin.organisationId)) <= 1) {
      throw new HttpError('conflict', 'The organisation needs at least one active administrator.');
    }
    await setUserRole(ctx.db, admin.organisationId, target.id, parsed.value.role);
    req.session.flash = { kind: 'info', text: `${target.name} is now ${res.app.locals.roleLabels[parsed.value.role]}.` };
    res.redirect('/admin/users');
  });

  router.post('/:id/active', async (req, res) => {
    const admin = contextOf(req).user;
    const target = await loadTarget(admin.organisationId, req.params.id);
    const parsed = parseForm(activeForm, req.body);
    if (!parsed.ok) throw new HttpError('invalid', undefined, parsed.errors);
    if (!parsed.value.active && target.id === admin.id) {
      throw new HttpError('conflict', 'You cannot deactivate your own account.');
    }
    await setUserActive(ctx.db, admin.organisationId, target.id, parsed.value.active);
    req.session.flash = {
      kind: 'info',
      text: parsed.value.active ? `${target.name} can sign in again.` : `${target.name} is deactivated and signed out everywhere.`,
    };
    res.redirect('/admin/users');
  });

  router.post('/:id/reset', async (req, res) => {
    const admin = contextOf(req).user;
    const target = await loadTarget(admin.organisationId, req.params.id);
    if (!target.active) throw new HttpError('conflict', 'Reactivate the account before sending a reset link.');
    if (target.hasPassword) await sendPasswordResetLink(ctx, target);
    else await sendInvitation(ctx, target, admin);
    req.session.flash = { kind: 'info', text: `A new link was sent to ${target.email}.` };
    res.redirect('/admin/users');
  });

  return router;
}
