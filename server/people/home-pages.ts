import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { requireRole } from '../platform/guards';
import { OFFICE_ROLES, ROLE_SUMMARIES, homeFor } from '../platform/roles';
import { countUsers } from './db';

export function homePages(ctx: AppContext): Router {
  const router = Router();

  router.get('/', (req, res) => {
    res.redirect(req.user ? homeFor(req.user.role) : '/login');
  });

  // The office dashboard: admin and clerk work here; the auditor sees the same, read-only.
  router.get('/office', requireRole(...OFFICE_ROLES), async (req, res) => {
    const user = req.user!;
    const counts = await countUsers(ctx.db, user.organisationId);
    res.render('office/dashboard', {
      title: 'Office',
      counts,
      roleSummary: ROLE_SUMMARIES[user.role],
      readOnly: user.role === 'auditor',
    });
  });

  return router;
}
