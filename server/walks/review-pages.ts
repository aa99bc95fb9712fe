import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { allows, can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { parseForm } from '../platform/validation';
import type { Formatter } from '../platform/format';
import { getCalibration } from '../calibrations/public';
import { getField, ranchOptions } from '../registry/public';
import { listUsers } from '../people/public';
import { listWalks } from './service';
import * as service from './service';
import { lengthForBiomass } from '../../shared/calc';
import { WALK_FLAG_LABELS, explainWalkFlag, outlierStops, walkFlags } from '../../shared/registry/walk-flags';
import { ownReviewWaiverSchema, tissueNSchema, walkRejectSchema, type Walk, type WalkEstimate, type WalkStatus } from '../../shared/schemas/walks';
import { setTissueN, tissueNView } from './tissue-n-service';
import { DECISION_BASIS_NAMES, adviceText, biomassAgainstThreshold, percent, reasonText, type UnitSystem } from '../../shared/format';
import { dotPlotSvg, mapSketchSvg, mean, walkRow, walkUnits, walksCsv } from './output';
import { walkPlanView } from './plan-view';

/*
 * Walk review (README, "Walk review"): the queue of field walks and each walk's evidence for
 * clerks and admins, who approve or reject submitted walks, and for auditors, who read, print and
 * export. The status steps are the walks service's (server/walks/service.ts); this file only
 * shapes pages. Samplers get 403: they see their walks and reasons in /capture.
 */

const PAGE = 50;
export const WALK_TABS = ['submitted', 'approved', 'rejected', 'all'] as const;
type Tab = (typeof WALK_TABS)[number];
const TAB_LABELS: Record<Tab, string> = { submitted: 'To review', approved: 'Approved', rejected: 'Rejected', all: 'All' };
const STATUS_LABELS: Record<WalkStatus, string> = { draft: 'Draft', submitted: 'Submitted', approved: 'Approved', rejected: 'Rejected' };

const id = z.string().trim().max(100);
const listQuery = z.object({
  status: z.enum(WALK_TABS).optional().catch(undefined),
  ranchId: id.optional().catch(undefined),
  samplerId: id.optional().catch(undefined),
  page: z.coerce.number().int().min(1).default(1).catch(1),
});
type ListQuery = z.infer<typeof listQuery>;


/** Clerks and admins land on the review queue; auditors on what counts in registers. */
/**
 * The stored verdict in words for the walk page, from its codes and SI numbers in the reader's
 * units (shared/format). An old snapshot keeps its stored note, shown as stored.
 */
export function verdictView(e: WalkEstimate, units: UnitSystem) {
  const reader = { lang: 'en' as const, units };
  const compared = biomassAgainstThreshold(e.biomassKgHa, e.thresholdKgHa, units);
  const legacy = Boolean(e.judgedBeforeDecisionBases) || !e.verdictReasons;
  const basis = e.decisionBasis ?? 'point';
  return {
    verdict: e.verdict ?? (e.meetsThreshold ? 'meets' : 'below'),
    legacy,
    basis: legacy
      ? 'Judged before decision bases existed: the point estimate against the threshold.'
      : `Decided by the ${DECISION_BASIS_NAMES.en[basis]} at ${percent(e.confidence ?? e.level)} confidence, at least ${e.minPlants} plants.`,
    rule: e.ruleVersion != null ? `Credit rule version ${e.ruleVersion}` : legacy ? 'Not stored (walks stored before rule versions were kept with the estimate)' : 'Typical values (no rule version saved)',
    biomass: compared.value.full,
    threshold: compared.threshold.full,
    nearness: compared.nearness,
    combined: e.combinedInterval ? `${biomassAgainstThreshold(e.combinedInterval[0], e.thresholdKgHa, units).value.text}–${biomassAgainstThreshold(e.combinedInterval[1], e.thresholdKgHa, units).value.full}` : null,
    confidence: percent(e.confidence ?? e.level),
    reasons: (e.verdictReasons ?? []).map((r) => reasonText(r, reader)),
    cautions: (e.verdictCautions ?? []).map((r) => reasonText(r, reader)),
    advice: e.morePlants ? adviceText(e.morePlants, reader) : null,
  };
}

const defaultTab = (req: Request): Tab => (contextOf(req).can('walks.review') ? 'submitted' : 'approved');

export function walkReviewPages(ctx: AppContext): Router {
  const router = Router();
  const { db } = ctx;
  const reviewers = can('walks.review');
  router.use('/walks', can('walks.readAll'));

  router.get('/walks', async (req, res) => {
    const q = listQuery.parse(req.query);
    const tab = q.status ?? defaultTab(req);
    res.render('walks/index', await queueView(req, res, q, tab));
  });

  router.get('/walks/export.csv', async (req, res) => {
    const q = listQuery.parse(req.query);
    const tab = q.status ?? defaultTab(req);
    const walks: Walk[] = [];
    for (let offset = 0; ; offset += 500) {
      const { items, total } = await listWalks(db, contextOf(req).organisationId, { ...filterOf(q, tab), limit: 500, offset });
      walks.push(...items);
      if (!items.length || walks.length >= total) break;
    }
    res.type('text/csv; charset=utf-8');
    res.attachment(`crowntip-walks-${tab}.csv`);
    res.send(walksCsv(walks));
  });

  router.get('/walks/:id', async (req, res) => {
    res.render('walks/show', await detailView(req, res));
  });

  router.post('/walks/:id/approve', reviewers, async (req, res) => {
    await review(req, res, { approve: true });
  });

  router.post('/walks/:id/reject', reviewers, async (req, res) => {
    const parsed = parseForm(walkRejectSchema, req.body);
    if (!parsed.ok) {
      return res.status(400).render('walks/show', await detailView(req, res, { errors: parsed.errors, values: { reason: String(req.body?.reason ?? '') } }));
    }
    await review(req, res, { approve: false, reason: parsed.value.reason });
  });

  router.post('/walks/:id/own-review-waiver', can('walks.waiveOwnReview'), async (req, res) => {
    const parsed = parseForm(ownReviewWaiverSchema, req.body);
    if (!parsed.ok) {
      return res.status(400).render('walks/show', await detailView(req, res, { errors: parsed.errors, values: { reason: String(req.body?.reason ?? '') } }));
    }
    await service.waiveOwnReview(db, contextOf(req), String(req.params.id), parsed.value.reason);
    req.session.flash = { kind: 'info', text: 'Waiver recorded: the person who walked this field may review this walk. The reason is kept with the walk and in the register.' };
    res.redirect(303, `/walks/${encodeURIComponent(String(req.params.id))}`);
  });

  // The lab's tissue N %: any walk status, since it never changes the verdict.
  router.post('/walks/:id/tissue-n', can('walks.tissueN'), async (req, res) => {
    const walkId = String(req.params.id);
    const raw = String(req.body?.tissueN ?? '').trim();
    const parsed = parseForm(tissueNSchema, { percent: raw === '' ? null : Number(raw) });
    if (!parsed.ok) {
      return res.status(400).render('walks/show', await detailView(req, res, { errors: { tissueN: parsed.errors.percent ?? Object.values(parsed.errors)[0] ?? '' }, values: { tissueN: raw } }));
    }
    await service.getWalkFor(db, contextOf(req), walkId); // 404 for another organisation's walk
    await setTissueN(db, contextOf(req), walkId, parsed.value.percent);
    req.session.flash = { kind: 'info', text: parsed.value.percent === null ? 'Lab tissue N cleared.' : `Lab tissue N saved: ${parsed.value.percent} %.` };
    res.redirect(303, `/walks/${encodeURIComponent(walkId)}#tissue-n`);
  });

  /** Approve or reject through the walks service; a walk no longer waiting for review is a friendly message. */
  async function review(req: Request, res: Response, decision: { approve: true } | { approve: false; reason: string }) {
    const walkId = String(req.params.id);
    try {
      const walk = await service.reviewWalk(db, contextOf(req), walkId, decision);
      const what = `${walk.fieldName} · ${walk.ranchName}, ${(res.locals.fmt as Formatter).date(walk.walkedOn)}`;
      req.session.flash = decision.approve
        ? { kind: 'info', text: `Walk approved: ${what}. It now counts in registers.` }
        : { kind: 'info', text: `Walk rejected: ${what}. ${walk.sampler.name} sees the reason in the capture app.` };
      res.redirect(303, '/walks');
    } catch (err) {
      if (err instanceof HttpError && err.code === 'own_walk') {
        req.session.flash = { kind: 'error', text: 'Another reviewer must approve this walk: you walked this field. Nothing was changed.' };
        return res.redirect(303, `/walks/${encodeURIComponent(walkId)}`);
      }
      if (!(err instanceof HttpError && err.code === 'conflict')) throw err;
      const current = await service.getWalkFor(db, contextOf(req), walkId);
      const by = current.reviewedBy ? ` by ${current.reviewedBy.name}` : '';
      const when = current.reviewedAt ? ` on ${(res.locals.fmt as Formatter).date(current.reviewedAt)}` : '';
      const state = current.status === 'draft' ? 'still a draft: the sampler has not submitted it' : `already ${current.status}${by}${when}`;
      req.session.flash = { kind: 'error', text: `This walk is ${state}, so it cannot be ${decision.approve ? 'approved' : 'rejected'} now. Nothing was changed.` };
      res.redirect(303, `/walks/${encodeURIComponent(walkId)}`);
    }
  }

  // ---- views ----

  const filterOf = (q: ListQuery, tab: Tab) => ({
    status: tab === 'all' ? undefined : (tab as WalkStatus),
    ranchId: q.ranchId || undefined,
    samplerId: q.samplerId || undefined,
    // The walks waiting for review come oldest first: the longest-waiting is handled first.
    oldestFirst: tab === 'submitted',
  });

  async function queueView(req: Request, res: Response, q: ListQuery, tab: Tab) {
    const orgId = contextOf(req).organisationId;
    const u = walkUnits(res.locals.fmt as Formatter);
    const [{ items, total }, ranches, users, counts] = await Promise.all([
      listWalks(db, orgId, { ...filterOf(q, tab), limit: PAGE, offset: (q.page - 1) * PAGE }),
      ranchOptions(db, orgId),
      listUsers(db, orgId, { sort: 'name', dir: 'asc' }),
      Promise.all(WALK_TABS.map(async (t) => (await listWalks(db, orgId, { ...filterOf(q, t), limit: 1, offset: 0 })).total)),
    ]);
    // Anyone who can make a walk: samplers first, then clerks and admins.
    const samplers = users
      .filter((x) => allows(x.role, 'walks.create'))
      .sort((a, b) => Number(!allows(a.role, 'walks.assignee')) - Number(!allows(b.role, 'walks.assignee')))
      .map((x) => ({ id: x.id, name: allows(x.role, 'walks.assignee') ? x.name : `${x.name} (${x.role})` }));
    const link = (over: Partial<ListQuery> & { status?: Tab }) => {
      const p = new URLSearchParams();
      const status = over.status ?? tab;
      p.set('status', status);
      const ranchId = 'ranchId' in over ? over.ranchId : q.ranchId;
      const samplerId = 'samplerId' in over ? over.samplerId : q.samplerId;
      if (ranchId) p.set('ranchId', ranchId);
      if (samplerId) p.set('samplerId', samplerId);
      if (over.page && over.page > 1) p.set('page', String(over.page));
      return `/walks?${p}`;
    };
    const exportParams = new URLSearchParams({ status: tab });
    if (q.ranchId) exportParams.set('ranchId', q.ranchId);
    if (q.samplerId) exportParams.set('samplerId', q.samplerId);
    return {
      title: tab === 'submitted' ? 'Walks to review' : `Field walks: ${TAB_LABELS[tab].toLowerCase()}`,
      tab,
      tabs: WALK_TABS.map((t, i) => ({ key: t, label: TAB_LABELS[t], count: counts[i], href: link({ status: t, page: 1 }) })),
      query: q,
      ranches,
      samplers,
      rows: items.map((w) => walkRow(w, u)),
      total,
      page: q.page,
      pages: Math.max(1, Math.ceil(total / PAGE)),
      pageHref: (page: number) => link({ page }),
      exportHref: `/walks/export.csv?${exportParams}`,
      statusLabels: STATUS_LABELS,
      u,
    };
  }

  async function detailView(req: Request, res: Response, form: { errors?: Record<string, string>; values?: Record<string, string> } = {}) {
    const orgId = contextOf(req).organisationId;
    const walk = await service.getWalkFor(db, contextOf(req), String(req.params.id));
    const fmt = res.locals.fmt as Formatter;
    const u = walkUnits(fmt);
    const flags = walkFlags(walk);
    const odd = outlierStops(flags);
    const e = walk.estimate;
    const [calibration, field] = await Promise.all([e ? getCalibration(db, orgId, e.calibrationId) : undefined, getField(db, orgId, walk.fieldId)]);
    // The length the walk's own calibration needs for the threshold (not in the snapshot).
    let threshold: { cm: number; extrapolated: boolean } | null = null;
    if (e && calibration?.fit) {
      const inv = lengthForBiomass(calibration.fit, e.thresholdKgHa, { extrapolate: true });
      if (inv.ok) threshold = { cm: inv.x, extrapolated: inv.extrapolated };
    }
    const photoOf = new Map(walk.photos.map((p) => [p.stop, p]));
    const gpsStops = walk.plants.filter((p) => p.lat != null && p.lon != null).map((p) => ({ stop: p.stop, lat: p.lat!, lon: p.lon! }));
    const meanCm = e?.meanLengthCm ?? mean(walk.plants.map((p) => p.lengthCm));
    const dotPlot = walk.plants.length
      ? dotPlotSvg({
          id: 'walk-lengths',
          title: `Main shoot lengths of the ${walk.plants.length} plants`,
          unit: u.lengthUnit,
          plants: walk.plants.map((p) => ({ stop: p.stop, value: u.lengthValue(p.lengthCm), text: u.len(p.lengthCm), outlier: odd.has(p.stop) })),
          mean: { value: u.lengthValue(meanCm), text: `mean ${u.len(meanCm)}` },
          threshold: threshold ? { value: u.lengthValue(threshold.cm), text: `needed ${u.len(threshold.cm)}` } : null,
        })
      : '';
    const planView = walkPlanView(walk, field ?? null, fmt.units);
    const plannedAt =
      planView.kind === 'planned' && planView.plan.mode === 'boundary'
        ? { stops: planView.stops.map((s) => ({ stop: s.stop, lat: s.lat!, lon: s.lon! })), legs: planView.legs }
        : null;
    const sketch = gpsStops.length || plannedAt
      ? mapSketchSvg({
          id: 'walk-map',
          title: `Sketch of ${walk.fieldName} with the ${gpsStops.length} stop${gpsStops.length === 1 ? '' : 's'} where GPS was recorded${plannedAt ? ' and the planned stops' : ''}`,
          boundary: field?.boundary ?? null,
          stops: gpsStops,
          outliers: odd,
          units: fmt.units,
          planned: plannedAt,
        })
      : '';
    const me = contextOf(req);
    // Nobody reviews their own walk unless an admin waived that for this walk (README, "Walk review").
    const ownWalk = walk.sampler.id === me.id && !walk.ownReviewWaiver;
    const canReview = me.can('walks.review') && walk.status === 'submitted' && !ownWalk;
    const ownWalkBlocked = me.can('walks.review') && walk.status === 'submitted' && ownWalk;
    const canWaive = ownWalkBlocked && me.can('walks.waiveOwnReview');
    const tissueN = await tissueNView(db, orgId, walk.id);
    return {
      title: `Walk: ${walk.fieldName} · ${walk.ranchName}`,
      walk,
      field: field ?? null,
      flags: flags.map((f) => ({ code: f.code, label: WALK_FLAG_LABELS[f.code], text: explainWalkFlag(f, { length: u.len, biomass: u.bio, system: fmt.units }) })),
      verdict: e ? verdictView(e, fmt.units) : null,
      outliers: odd,
      threshold,
      calibration: calibration ? { id: calibration.id, version: calibration.version, label: calibration.label, status: calibration.status } : null,
      photoOf,
      gpsCount: gpsStops.length,
      dotPlot,
      sketch,
      planView,
      meanCm,
      canReview,
      ownWalkBlocked,
      canWaive,
      tissueN,
      canSetTissueN: contextOf(req).can('walks.tissueN'),
      row: walkRow(walk, u),
      statusLabels: STATUS_LABELS,
      errors: form.errors ?? {},
      values: form.values ?? {},
      u,
    };
  }

  return router;
}
