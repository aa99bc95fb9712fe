import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can, homeFor } from '../platform/permissions';
import { ROLE_SUMMARIES } from '../platform/roles';
import { countUsers } from './service';
import { todayIso } from '../../shared/registry/season';
import { workQueue } from './service';

export function homePages(ctx: AppContext): Router {
  const router = Router();

  router.get('/', (req, res) => {
    res.redirect(req.user ? homeFor(req.user.role) : '/login');
  });

  // The office dashboard: admin and clerk work here; the auditor sees the same, read-only.
  // A sampler's work is on the phone: send them there rather than to a refusal.
  router.get('/office', (req, res, next) => {
    if (req.user && !contextOf(req).can('office.use') && contextOf(req).can('capture.use')) return res.redirect('/capture');
    next();
  });
  router.get('/office', can('office.use'), async (req, res) => {
    const user = contextOf(req).user;
    const counts = await countUsers(ctx.db, user.organisationId);
    const queue = await workQueue(ctx.db, user.organisationId, todayIso());
    res.render('office/dashboard', {
      title: 'Office',
      counts,
      queue,
      canReview: contextOf(req).can('walks.review'),
      canFinalise: contextOf(req).can('registers.finalise'),
      roleSummary: ROLE_SUMMARIES[user.role],
      readOnly: !contextOf(req).can('registry.write'),
    });
  });

  return router;
}
