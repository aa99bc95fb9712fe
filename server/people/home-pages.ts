import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can, homeFor } from '../platform/permissions';
import { ROLE_SUMMARIES } from '../platform/roles';
import { countUsers } from './service';

export function homePages(ctx: AppContext): Router {
  const router = Router();

  router.get('/', (req, res) => {
    res.redirect(req.user ? homeFor(req.user.role) : '/login');
  });

  // The office dashboard: admin and clerk work here; the auditor sees the same, read-only.
  router.get('/office', can('office.use'), async (req, res) => {
    const user = contextOf(req).user;
    const counts = await countUsers(ctx.db, user.organisationId);
    res.render('office/dashboard', {
      title: 'Office',
      counts,
      roleSummary: ROLE_SUMMARIES[user.role],
      readOnly: !contextOf(req).can('registry.write'),
    });
  });

  return router;
}
