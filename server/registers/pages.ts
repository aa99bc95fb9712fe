import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { getRegister, latestRegister, listRegisterVersions } from './service';
import { diffRegisters } from './diff';
import { endOfYear } from './registry-as-of';
import { keyringOf } from './signing';
import { organisationSummary } from './summary';
import { registerRanches } from './service';
import { dateTime } from '../../shared/format/figures';
import { todayIso } from '../../shared/registry/season';
import { barChartSvg } from './chart';
import { CAUTIONS, asDraft, asFinal, cropLabel, registerFieldLines, registerFileStem, registerUnits, shortId } from './format';
import { registerPdf } from './pdf';
import { createRegisterJobs } from './jobs';
import {
  MAX_YEAR,
  MIN_YEAR,
  computeRegister,
  finaliseRegister,
  UnchangedRegister,
  getFinalRegister,
  parseStored,
  reportingYearOf,
  verifyStored,
  signatureState,
} from './service';

const yearParam = z.coerce.number().int().min(MIN_YEAR).max(MAX_YEAR);
const overviewQuery = z.object({ year: yearParam.optional().catch(undefined), job: z.string().max(64).optional().catch(undefined) });
const paperQuery = z.object({ paper: z.enum(['a4', 'letter']).optional().catch(undefined) });

/** The overview's year choices: the season in progress and the four before it. */
const yearChoices = (current: number) => [current, current - 1, current - 2, current - 3, current - 4];

const wantsJson = (req: Request) => req.accepts(['html', 'json']) === 'json';

/**
 * Credit register pages (README, "Credit registers"): the organisation's overview with its chart
 * and background build, a ranch's draft with the Finalise form, and each finalised version with
 * its provenance, amendment diff, print view, files and "Send to grower".
 */
export function registerPages(ctx: AppContext): Router {
  const router = Router();
  const keyring = keyringOf(ctx.config);
  const readers = can('registers.read');
  const writers = can('registers.finalise');
  const jobs = createRegisterJobs({ db: ctx.db, jobs: ctx.jobs, logger: ctx.logger });
  router.use('/registers', readers);

  const parseYear = (raw: string) => {
    const y = yearParam.safeParse(raw);
    if (!y.success) throw new HttpError('not_found');
    return y.data;
  };

  // ---- the organisation's overview ----
  router.get('/registers', async (req, res) => {
    const q = overviewQuery.parse(req.query);
    const today = todayIso();
    const current = reportingYearOf(today);
    const year = q.year ?? current;
    const orgId = contextOf(req).organisationId;
    const summary = await organisationSummary(ctx.db, orgId, year, today);
    const rf = registerUnits(contextOf(req).units);
    const chart = summary.ranches.length
      ? barChartSvg({
          id: 'credit-by-ranch',
          title: `Credit by ranch, ${year}`,
          description: summary.ranches.map((r) => `${r.ranchName}: ${rf.massN(r.shown.creditKgN)}${r.final ? ` (version ${r.final.version})` : ' (draft)'}`).join('; '),
          axisLabel: `Credit (${rf.massUnit}); hatched bars are drafts, solid bars finalised versions`,
          emptyNote: `No credit yet in ${year}: no field has earned any ${rf.massUnit}.`,
          formatTick: (n) => rf.num(n, 0),
          bars: summary.ranches.map((r) => ({ label: r.ranchName, value: rf.massValue(r.shown.creditKgN), valueText: rf.massN(r.shown.creditKgN), muted: !r.final })),
        })
      : '';
    const job = q.job ? await jobs.status(orgId, q.job) : undefined;
    res.render('registers/index', {
      title: `Credit registers ${year}`,
      year,
      years: yearChoices(Math.max(current, year)),
      summary,
      chart,
      rf,
      job: job ?? null,
      shortId,
    });
  });

  // ---- the organisation's register, built in the background ----
  router.post('/registers/jobs', async (req, res) => {
    const y = yearParam.safeParse(req.body?.year);
    if (!y.success) throw new HttpError('invalid', 'Choose a reporting year.', { year: 'Choose a reporting year.' });
    const status = await jobs.start(contextOf(req).organisationId, y.data, contextOf(req).user);
    if (wantsJson(req)) {
      res.status(202).json({ ...status, statusUrl: `/registers/jobs/${status.id}` });
      return;
    }
    res.redirect(303, `/registers?year=${y.data}&job=${status.id}#organisation-register`);
  });

  const GONE = 'This build is unknown or has expired (results are kept for an hour). Start a new one.';
  const sendFile = (kind: 'csv' | 'pdf') => async (req: Request<{ id: string }>, res: Response) => {
    const file = await jobs.file(contextOf(req).organisationId, req.params.id, kind);
    if (!file) throw new HttpError('not_found', GONE);
    if (!file.ready || !file.data) throw new HttpError('conflict', 'The register is still being built.');
    res.setHeader('Content-Type', file.contentType!);
    res.setHeader('Content-Disposition', `attachment; filename="${file.name}"`);
    res.send(file.data);
  };
  router.get('/registers/jobs/:id.csv', sendFile('csv'));
  router.get('/registers/jobs/:id.pdf', sendFile('pdf'));
  router.get('/registers/jobs/:id', async (req, res) => {
    const status = await jobs.status(contextOf(req).organisationId, req.params.id);
    if (!status) throw new HttpError('not_found', GONE);
    res.setHeader('Cache-Control', 'no-store');
    res.json(status);
  });

  // ---- a finalised version ----
  const loadVersion = async (req: Request) => {
    const orgId = contextOf(req).organisationId;
    const stored = await getRegister(ctx.db, orgId, String(req.params.id));
    if (!stored) throw new HttpError('not_found');
    return { stored, final: parseStored(stored) };
  };

  router.get('/registers/v/:id', async (req, res) => {
    const orgId = contextOf(req).organisationId;
    const { stored, final } = await loadVersion(req);
    const { paper } = paperQuery.parse(req.query);
    const previous = final.previousId ? await getFinalRegister(ctx.db, orgId, final.previousId) : undefined;
    const [ranch] = await registerRanches(ctx.db, orgId, [final.ranch.id]);
    const versions = await listRegisterVersions(ctx.db, orgId, final.ranch.id, final.year);
    res.render('registers/version', {
      title: `Credit register ${final.ranch.name} ${final.year}, version ${final.version}`,
      doc: asFinal(final),
      previous: previous ? { id: previous.id, version: previous.version } : null,
      diff: previous ? diffRegisters(previous, final) : null,
      hashVerified: verifyStored(stored),
      signature: { state: await signatureState(ctx.db, orgId, stored, keyring), keyId: stored.signingKeyId, chainHash: stored.chainHash },
      versions,
      newest: versions[0]?.id === final.id,
      contactEmails: ranch?.contactEmails ?? [],
      paper: paper ?? 'a4',
      rf: registerUnits(contextOf(req).units),
      cautions: CAUTIONS,
      cropLabel,
      shortId,
    });
  });

  router.post('/registers/v/:id/send', writers, async (req, res) => {
    const orgId = contextOf(req).organisationId;
    const { final } = await loadVersion(req);
    const [ranch] = await registerRanches(ctx.db, orgId, [final.ranch.id]);
    const to = ranch?.contactEmails ?? [];
    if (!to.length) {
      req.session.flash = { kind: 'error', text: 'This ranch has no grower addresses. Add them on the ranch record first.' };
      res.redirect(303, `/registers/v/${final.id}`);
      return;
    }
    const doc = asFinal(final);
    const rf = registerUnits(contextOf(req).units);
    // Nothing is sent until confirmed: a page without script, the form's dialog with it (client/office.ts).
    if (req.body?.confirmed !== 'yes') {
      res.render('confirm', {
        title: 'Send to grower?',
        heading: `Send version ${final.version} of ${final.ranch.name}’s ${final.year} register?`,
        lines: [
          `To: ${to.join(', ')}`,
          `The PDF of version ${final.version}, finalised by ${final.finalisedBy.name} on ${dateTime(final.finalisedAt)}; credit total ${rf.massN(final.totals.creditKgN)}.`,
          'An e-mail cannot be taken back. The message is kept in the Outbox.',
        ],
        action: `/registers/v/${final.id}/send`,
        fields: {},
        confirmLabel: 'Send now',
        cancelHref: `/registers/v/${final.id}`,
      });
      return;
    }
    const pdf = await registerPdf([doc], { units: contextOf(req).units });
    const t = final.totals;
    await ctx.mailer.send({
      organisationId: orgId,
      to: to.join(', '),
      subject: `Credit register ${final.year}: ${final.ranch.name} (version ${final.version})`,
      text: [
        `Attached is the nitrogen scavenging credit register of ${final.ranch.name} for reporting year ${final.year} (the ${final.season.replace('-', '–')} season), version ${final.version}, finalised by ${final.finalisedBy.name} on ${dateTime(final.finalisedAt)}.`,
        '',
        `Fields: ${t.fields}; eligible: ${t.eligibleFields} (${rf.area(t.eligibleAreaHa)} of ${rf.area(t.totalAreaHa)}).`,
        `Credit total: ${rf.massN(t.creditKgN)} (${rf.num(t.creditKgN, 1)} kg N).`,
        '',
        ...registerFieldLines(final, rf),
        ...(final.rows.some((r) => r.walk?.shootN) ? ['', rf.shootNCaution] : []),
        '',
        `Content hash (SHA-256): ${final.contentHash}`,
        '',
        ...CAUTIONS,
        '',
        `Sent by ${contextOf(req).name} (${contextOf(req).user.organisationName}) with Crowntip.`,
      ].join('\n'),
      attachments: [{ filename: `${registerFileStem(doc)}.pdf`, contentType: 'application/pdf', content: pdf }],
    });
    req.session.flash = { kind: 'info', text: `Register version ${final.version} sent as PDF to ${to.join(', ')}.` };
    res.redirect(303, `/registers/v/${final.id}`);
  });

  // ---- a ranch's register for a year: the draft and the Finalise form ----
  const showDraft = async (req: Request, res: Response, status = 200, errors: Record<string, string> = {}) => {
    const orgId = contextOf(req).organisationId;
    const year = parseYear(String(req.params.year));
    // Past years read the registry as it stood at their cut-off; `registry=today` is an amendment made on purpose.
    const registry = (req.method === 'POST' ? req.body?.registry : req.query.registry) === 'today' ? 'today' : 'cutoff';
    const draft = await computeRegister(ctx.db, orgId, String(req.params.ranchId), year, todayIso(), { registry });
    if (!draft) throw new HttpError('not_found');
    const latest = await latestRegister(ctx.db, orgId, draft.ranch.id, year);
    const latestFinal = latest ? parseStored(latest) : null;
    // Without a version to compare with, today's registry is compared with the registry at the cut-off.
    const atCutoff = registry === 'today' && !latestFinal ? await computeRegister(ctx.db, orgId, draft.ranch.id, year, todayIso()) : null;
    const cutoffDraft = registry === 'cutoff' ? draft : atCutoff;
    const versions = await listRegisterVersions(ctx.db, orgId, draft.ranch.id, year);
    res.status(status).render('registers/draft', {
      title: `Credit register ${draft.ranch.name} ${year} (draft)`,
      doc: asDraft(draft),
      versions,
      latest: latestFinal ? { id: latestFinal.id, version: latestFinal.version } : null,
      diff: latestFinal ? diffRegisters(latestFinal, draft) : null,
      registry,
      // The cut-off in effect (null while the year is open and nothing is finalised: the registry is read live).
      registryAsOf: cutoffDraft && (latestFinal || new Date().toISOString() > endOfYear(year)) ? cutoffDraft.registryAsOf ?? null : null,
      registryDiff: atCutoff && atCutoff.registryAsOf !== draft.registryAsOf ? diffRegisters(atCutoff, draft) : null,
      errors,
      rf: registerUnits(contextOf(req).units),
      cautions: CAUTIONS,
      cropLabel,
      shortId,
    });
  };

  router.get('/registers/:ranchId/:year', (req, res) => showDraft(req, res));

  router.post('/registers/:ranchId/:year', writers, async (req, res) => {
    const ranchId = String(req.params.ranchId);
    const year = parseYear(String(req.params.year));
    if (req.body?.confirm !== 'yes') {
      return showDraft(req, res, 400, { confirm: 'Tick the box to confirm that the rows are checked; a finalised register cannot be changed.' });
    }
    try {
      const registry = req.body?.registry === 'today' ? 'today' : 'cutoff';
      const final = await finaliseRegister(ctx.db, contextOf(req).organisationId, ranchId, year, contextOf(req).user, todayIso(), keyring, undefined, registry);
      req.session.flash = {
        kind: 'info',
        text: final.version === 1 ? `Register finalised as version 1.` : `Amendment finalised as version ${final.version}; the changes from version ${final.version - 1} are listed below.`,
      };
      res.redirect(303, `/registers/v/${final.id}`);
    } catch (err) {
      if (err instanceof UnchangedRegister) {
        req.session.flash = { kind: 'info', text: `Nothing changed since version ${err.version}. There is nothing to amend.` };
        res.redirect(303, `/registers/${encodeURIComponent(ranchId)}/${year}`);
        return;
      }
      if (err instanceof HttpError && err.code === 'conflict') {
        req.session.flash = { kind: 'error', text: err.message };
        res.redirect(303, `/registers/${encodeURIComponent(ranchId)}/${year}`);
        return;
      }
      throw err;
    }
  });

  return router;
}
