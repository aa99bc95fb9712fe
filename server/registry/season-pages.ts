import { Router, type Request } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { CROPS } from '../../shared/calc/rules';
import { seasonLabel, seasonOfDate, seasonStartYear, seasonStarting, todayIso } from '../../shared/registry/season';
import { seasonSchema } from '../../shared/schemas/registry';
import { ranchOptions } from './service';
import { currentCreditRule } from '../rules/public';
import { seasonRows } from './season-view';
import { toCsv } from '../platform/csv-safe';
import { cropName } from '../../shared/registry/crops';
import { listAssignableSamplers } from '../people/public';

const seasonQuery = z.object({
  season: seasonSchema.optional().catch(undefined),
  ranchId: z.string().max(64).optional().catch(undefined),
  crop: z.enum(CROPS).optional().catch(undefined),
});

/** The organisation's season at a glance: every field, its planting and its days in the rainy window. */
export function seasonPages(ctx: AppContext): Router {
  const router = Router();
  router.use('/registry/season', can('registry.read'));

  const load = async (req: Request) => {
    const q = seasonQuery.parse(req.query);
    const today = todayIso();
    const season = q.season ?? seasonOfDate(today);
    const rule = await currentCreditRule(ctx.db, contextOf(req).organisationId);
    const rows = await seasonRows(ctx.db, contextOf(req).organisationId, { season, ranchId: q.ranchId || undefined, crop: q.crop, today, rule });
    return { q, season, rule, rows, today };
  };

  router.get('/registry/season', async (req, res) => {
    const { q, season, rule, rows, today } = await load(req);
    const now = seasonStartYear(seasonOfDate(today));
    res.render('registry/season', {
      title: `Season ${seasonLabel(season)}`,
      rows,
      season,
      seasons: [now + 1, now, now - 1, now - 2, now - 3].map(seasonStarting),
      seasonLabel,
      query: q,
      ranches: await ranchOptions(ctx.db, contextOf(req).organisationId),
      crops: CROPS,
      rule,
      today,
      samplers: await listAssignableSamplers(ctx.db, contextOf(req).organisationId),
      assignedCount: Number(req.query.assigned) || 0,
      currentUrl: req.originalUrl.replace(/[?&]assigned=\d+/, ''),
      csvHref: `/registry/season.csv?${new URLSearchParams(Object.entries({ season, ranchId: q.ranchId ?? '', crop: q.crop ?? '' }).filter(([, v]) => v))}`,
    });
  });

  router.get('/registry/season.csv', can('registry.read'), async (req, res) => {
    const { season, rows } = await load(req);
    const header = ['ranch', 'field', 'area_ha', 'crop', 'crop_name', 'variety', 'seeded_on', 'terminated_on', 'planned_termination_on', 'days_since_seeding', 'days_in_window', 'walk_status'];
    const body = rows.map((r) => [
      r.ranchName,
      r.fieldName,
      r.areaHa.toFixed(3),
      r.crop ?? '',
      r.crop ? cropName(r.crop) : '',
      r.variety ?? '',
      r.seededOn ?? '',
      r.terminatedOn ?? '',
      r.plannedTerminationOn ?? '',
      r.daysSinceSeeding ?? '',
      r.daysInWindow ?? '',
      r.plantingId ? r.walkStatus : 'no planting',
    ]);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="crowntip-season-${season}.csv"`);
    res.send(toCsv(body, header));
  });

  return router;
}
