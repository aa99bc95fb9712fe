import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getRegister, latestRegister, listRegisterVersions } from './service';
import { diffRegisters } from './diff';
import { keyringOf } from './signing';
import { todayIso } from '../../shared/registry/season';
import { asFinal, registerFileStem } from './format';
import { registerCsv } from './csv';
import { registerPdf } from './pdf';
import {
  MAX_YEAR,
  MIN_YEAR,
  computeRegister,
  finaliseRegister,
  getFinalRegister,
  parseStored,
  verifyStored,
  signatureState,
  type FinalRegister,
} from './service';

const ranchId = z.string({ message: 'Choose a ranch.' }).trim().min(1, 'Choose a ranch.').max(64);
const YEAR_MESSAGES = ['Give the reporting year, e.g. 2027.', `The year must be ${MIN_YEAR} or later.`, `The year must be ${MAX_YEAR} or earlier.`] as const;
const year = z.coerce.number({ message: YEAR_MESSAGES[0] }).int(YEAR_MESSAGES[0]).min(MIN_YEAR, YEAR_MESSAGES[1]).max(MAX_YEAR, YEAR_MESSAGES[2]);

/** `registry=today`: the rows from the registry as it is now instead of at the year's cut-off (an amendment on purpose). */
const registryChoice = z.enum(['cutoff', 'today'], { message: 'Choose cutoff or today.' }).optional();
const registerQuery = z.object({ ranchId, year, draft: z.enum(['1', 'true', '0', 'false', '']).optional(), registry: registryChoice });
const versionsQuery = z.object({ ranchId, year });
const finaliseBody = z.object({
  ranchId,
  year: z.number({ message: YEAR_MESSAGES[0] }).int(YEAR_MESSAGES[0]).min(MIN_YEAR, YEAR_MESSAGES[1]).max(MAX_YEAR, YEAR_MESSAGES[2]),
  registry: registryChoice,
});
const paperQuery = z.object({ paper: z.enum(['a4', 'letter']).optional().catch(undefined) });

export const IMMUTABLE_MESSAGE = 'A finalised register never changes; finalise again to make an amendment.';

/** A finalised version as the API answers it, with what changed from the version before. */
async function withDiff(ctx: AppContext, organisationId: string, final: FinalRegister) {
  const previous = final.previousId ? await getFinalRegister(ctx.db, organisationId, final.previousId) : undefined;
  return { status: 'final' as const, ...final, diff: previous ? diffRegisters(previous, final) : null };
}

/**
 * /api/registers (README, "API" and "Credit registers"): admins,
 * clerks and auditors read; clerks and admins finalise; nothing changes a finalised version.
 */
export function registersApi(ctx: AppContext): Router {
  const router = Router();
  const keyring = keyringOf(ctx.config);
  const readers = can('registers.read');
  const writers = can('registers.finalise');

  const current = async (req: Request, res: Response) => {
    const q = res.locals.query as z.infer<typeof registerQuery>;
    const orgId = contextOf(req).organisationId;
    const wantDraft = q.draft === '1' || q.draft === 'true';
    const latest = wantDraft ? undefined : await latestRegister(ctx.db, orgId, q.ranchId, q.year);
    if (latest) {
      res.json(await withDiff(ctx, orgId, parseStored(latest)));
      return;
    }
    const draft = await computeRegister(ctx.db, orgId, q.ranchId, q.year, todayIso(), { registry: q.registry });
    if (!draft) throw new HttpError('not_found');
    res.json({ status: 'draft', ...draft });
  };

  const finalise = async (req: Request, res: Response) => {
    const body = req.body as z.infer<typeof finaliseBody>;
    const orgId = contextOf(req).organisationId;
    const final = await finaliseRegister(ctx.db, orgId, body.ranchId, body.year, contextOf(req).user, todayIso(), keyring, undefined, body.registry);
    res.status(201).json(await withDiff(ctx, orgId, final));
  };

  const versions = async (req: Request, res: Response) => {
    const q = res.locals.query as z.infer<typeof versionsQuery>;
    const items = await listRegisterVersions(ctx.db, contextOf(req).organisationId, q.ranchId, q.year);
    res.json({ items, total: items.length });
  };

  const load = async (req: Request<{ id: string }>) => {
    const stored = await getRegister(ctx.db, contextOf(req).organisationId, req.params.id);
    if (!stored) throw new HttpError('not_found');
    return stored;
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const stored = await load(req);
    const orgId = contextOf(req).organisationId;
    res.json({
      ...(await withDiff(ctx, orgId, parseStored(stored))),
      hashVerified: verifyStored(stored),
      signature: { state: await signatureState(ctx.db, orgId, stored, keyring), keyId: stored.signingKeyId, chainHash: stored.chainHash },
    });
  };

  const csv = async (req: Request<{ id: string }>, res: Response) => {
    const doc = asFinal(parseStored(await load(req)));
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="${registerFileStem(doc)}.csv"`);
    res.setHeader('X-Content-Hash', doc.contentHash!);
    res.send(registerCsv([doc], contextOf(req).units));
  };

  const pdf = async (req: Request<{ id: string }>, res: Response) => {
    const doc = asFinal(parseStored(await load(req)));
    const { paper } = paperQuery.parse(req.query);
    const buffer = await registerPdf([doc], { units: contextOf(req).units, paper });
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `attachment; filename="${registerFileStem(doc)}.pdf"`);
    res.setHeader('X-Content-Hash', doc.contentHash!);
    res.send(buffer);
  };

  // Writers learn that the register exists and cannot change; a missing one is still 404.
  const immutable = async (req: Request<{ id?: string }>) => {
    if (req.params.id && !(await getRegister(ctx.db, contextOf(req).organisationId, req.params.id))) throw new HttpError('not_found');
    throw new HttpError('conflict', IMMUTABLE_MESSAGE);
  };

  router.get('/', readers, validateQuery(registerQuery), current);
  router.post('/', writers, validateBody(finaliseBody), finalise);
  router.get('/versions', readers, validateQuery(versionsQuery), versions);
  router.get('/:id.csv', readers, csv);
  router.get('/:id.pdf', readers, pdf);
  router.get('/:id', readers, show);
  for (const path of ['/', '/:id']) {
    router.patch(path, writers, immutable);
    router.put(path, writers, immutable);
    router.delete(path, writers, immutable);
  }
  return router;
}
