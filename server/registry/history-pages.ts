import { Router } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { historyAuthors, listHistory } from './service';
import { HISTORY_ACTION_WORDS, HISTORY_FIELD_LABELS, historySummary, historyValue } from './history-words';
import { isoDate } from '../../shared/schemas/registry';

const PAGE = 50;
const historyQuery = z.object({
  entityType: z.enum(['ranch', 'field', 'planting']).optional().catch(undefined),
  entityId: z.string().max(64).optional().catch(undefined),
  userId: z.string().max(64).optional().catch(undefined),
  action: z.enum(['create', 'update', 'delete', 'import']).optional().catch(undefined),
  from: isoDate.optional().catch(undefined),
  to: isoDate.optional().catch(undefined),
  page: z.coerce.number().int().min(1).default(1).catch(1),
});

const HREF: Record<string, string> = { ranch: '/registry/ranches/', field: '/registry/fields/', planting: '/registry/plantings/' };

/** The organisation's change history, read-only for every office role (auditors included). */
export function historyPages(ctx: AppContext): Router {
  const router = Router();
  router.get('/history', can('history.read'), async (req, res) => {
    const q = historyQuery.parse(req.query);
    const orgId = contextOf(req).organisationId;
    const { items, total } = await listHistory(ctx.db, orgId, {
      entityType: q.entityType,
      entityId: q.entityId || undefined,
      userId: q.userId || undefined,
      action: q.action,
      from: q.from,
      to: q.to,
      limit: PAGE,
      offset: (q.page - 1) * PAGE,
    });
    const params = (page: number) =>
      new URLSearchParams(Object.entries({ ...q, page: String(page) }).filter(([, v]) => v !== undefined && v !== '') as [string, string][]);
    res.render('history/index', {
      title: 'Change history',
      items,
      total,
      query: q,
      pages: Math.max(1, Math.ceil(total / PAGE)),
      pageHref: (p: number) => `/history?${params(p)}`,
      authors: await historyAuthors(ctx.db, orgId),
      recordHref: (type: string, id: string) => HREF[type] + id,
      words: { actions: HISTORY_ACTION_WORDS, labels: HISTORY_FIELD_LABELS, summary: historySummary, value: historyValue },
    });
  });
  return router;
}
