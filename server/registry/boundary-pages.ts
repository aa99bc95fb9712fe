import { Router, type Request, type Response } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { seasonOfDate, todayIso } from '../../shared/registry/season';
import * as registry from './service';
import { readBoundaryFile, shapeLabel } from './boundary-files';
import type { BoundaryUploads, KeptShapes } from './boundary-uploads';
import { planBoundaryImport, type ImportPlan } from './boundary-import';

/**
 * Many fields from one boundary file (clerk and admin): upload on the ranch → preview of every
 * shape by the chosen name attribute (which field it will update or create, or what is wrong) →
 * all rows written in one transaction, or none. The upload form is multipart and parsed before
 * the CSRF check (FIELD_FORM_PATHS in pages.ts).
 */
export function boundaryImportPages(ctx: AppContext, uploads: BoundaryUploads): Router {
  const router = Router();
  const { db } = ctx;
  const base = '/registry/ranches/:id/boundaries';
  router.use(base, can('registry.write'));

  const loadRanch = async (req: Request) => {
    const ranch = await registry.getRanch(db, contextOf(req).organisationId, String(req.params.id), seasonOfDate(todayIso()));
    if (!ranch) throw new HttpError('not_found');
    return ranch;
  };
  const loadKept = async (req: Request) => {
    const kept = await uploads.get(contextOf(req).organisationId, req.params.upload);
    if (!kept) throw new HttpError('not_found', 'This boundary file is no longer kept. Upload it again.');
    return kept;
  };

  router.get(base, async (req, res) => {
    const ranch = await loadRanch(req);
    res.render('registry/boundaries-upload', { title: `Import boundaries: ${ranch.name}`, ranch, errors: {} });
  });

  router.post(base, async (req, res) => {
    const ranch = await loadRanch(req);
    const file = req.file;
    const fail = (problem: string) => res.status(400).render('registry/boundaries-upload', { title: `Import boundaries: ${ranch.name}`, ranch, errors: { boundaryFile: problem } });
    if (!file || file.size === 0) return fail('Choose a boundary file to upload.');
    const read = await readBoundaryFile(file.originalname ?? '', file.buffer);
    if (!read.ok) return fail(read.problem);
    const { ok: _ok, ...rest } = read;
    const kept = await uploads.keep({ organisationId: contextOf(req).organisationId, fileName: String(file.originalname ?? '').slice(0, 200), ...rest });
    res.redirect(`/registry/ranches/${ranch.id}/boundaries/${kept.id}`);
  });

  const planFor = async (req: Request, res: Response, kept: KeptShapes, nameKey: unknown) => {
    const ranch = await loadRanch(req);
    const key = typeof nameKey === 'string' && kept.nameKeys.includes(nameKey) ? nameKey : kept.nameKeys[0];
    const { items } = await registry.listFields(db, contextOf(req).organisationId, { ranchId: ranch.id, limit: 10_000, offset: 0 });
    const existing = items.map((f) => ({ id: f.id, name: f.name, hasBoundary: Boolean(f.boundary) }));
    const plan: ImportPlan | null = key ? planBoundaryImport(kept.shapes, key, existing, (ha) => res.locals.fmt.area(ha, 2)) : null;
    return { ranch, plan };
  };

  const renderPreview = (res: Response, status: number, locals: { ranch: { id: string; name: string }; kept: KeptShapes; plan: ImportPlan | null; failed?: boolean }) =>
    res.status(status).render('registry/boundaries-preview', { title: `Import boundaries: ${locals.ranch.name}`, shapeLabel, failed: false, ...locals });

  router.get(`${base}/:upload`, async (req, res) => {
    const kept = await loadKept(req);
    const { ranch, plan } = await planFor(req, res, kept, req.query.name);
    renderPreview(res, 200, { ranch, kept, plan });
  });

  router.post(`${base}/:upload`, async (req, res) => {
    const kept = await loadKept(req);
    const { ranch, plan } = await planFor(req, res, kept, req.body?.name);
    // Checked again against the registry as it is now: all rows or none.
    if (!plan || plan.problems > 0) return renderPreview(res, 400, { ranch, kept, plan, failed: true });
    const rows = plan.rows.flatMap((r) => (r.action === 'problem' ? [] : [{ name: r.name, areaHa: r.areaHa, boundary: r.boundary, fieldId: 'fieldId' in r ? r.fieldId : undefined }]));
    try {
      await registry.importBoundaries(db, contextOf(req), ranch.id, rows);
    } catch (err) {
      // The registry changed since the preview (a field of that name added meanwhile): nothing written.
      if (err instanceof HttpError && err.code === 'invalid') return renderPreview(res, 400, { ranch, kept, plan: (await planFor(req, res, kept, req.body?.name)).plan, failed: true });
      throw err;
    }
    const { replace, add, create } = plan.counts;
    const parts = [create && `${create} new field${create === 1 ? '' : 's'}`, add && `${add} boundar${add === 1 ? 'y' : 'ies'} added`, replace && `${replace} boundar${replace === 1 ? 'y' : 'ies'} replaced`].filter(Boolean);
    req.session.flash = { kind: 'info', text: `Boundaries imported from ${kept.fileName}: ${parts.join(', ')}.` };
    res.redirect(`/registry/ranches/${ranch.id}`);
  });

  return router;
}
