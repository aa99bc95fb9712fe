import { pipeline } from 'node:stream/promises';
import { Router, type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import * as service from './service';
import { pagingSchema } from '../../shared/schemas/registry';
import { MAX_PLANTS, ownReviewWaiverSchema, walkCreateSchema, walkRejectSchema, walkStatusSchema, type WalkCreate } from '../../shared/schemas/walks';
import { idFilter, listQuery } from '../platform/query';

/** Largest photo accepted; the capture app shrinks photos well below this before sending. */
export const MAX_PHOTO_BYTES = 8 * 1024 * 1024;

const listSchema = listQuery(pagingSchema.extend({ status: walkStatusSchema.optional(), plantingId: idFilter.optional() }));
const photoFieldsSchema = z.object({
  stop: z.coerce.number({ message: 'Give the stop the photo shows.' }).int('Give the stop as a whole number.').min(1).max(MAX_PLANTS),
});


/** multer in memory, with its errors as the API's codes (413 too_large above the size limit). */
const photoUpload: RequestHandler = (() => {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_PHOTO_BYTES, files: 1, fields: 5, parts: 6 } }).single('photo');
  return (req, res, next) =>
    upload(req, res, (err?: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') return next(new HttpError('too_large', 'A photo may be at most 8 MB.'));
        return next(new HttpError('invalid', 'Send one photo in the field "photo" and the stop in the field "stop".', { photo: err.message }));
      }
      next(new HttpError('invalid', 'The upload could not be read.', { photo: 'The upload could not be read.' }));
    });
})();

/**
 * /api/walks (README, "API"): samplers, clerks and admins create walks; the
 * author (or a clerk or admin) adds photos and submits; clerks and admins approve or reject; a
 * sampler reads their own walks and those of plantings assigned to them, the office reads all.
 * Uploads carry the CSRF token in the X-CSRF-Token header (the check runs before multer).
 */
export function walksApi(ctx: AppContext): Router {
  const router = Router();
  const walkers = can('walks.create');
  const reviewers = can('walks.review');

  const list = async (req: Request, res: Response) => {
    res.json(await service.listWalksFor(ctx.db, contextOf(req), res.locals.query as z.infer<typeof listSchema>));
  };

  // 201 for a new walk, 200 with the stored one when the same walk is posted again.
  const create = async (req: Request, res: Response) => {
    const { walk, created } = await service.createWalk(ctx.db, contextOf(req), req.body as WalkCreate);
    res.status(created ? 201 : 200).json(walk);
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await service.getWalkFor(ctx.db, contextOf(req), req.params.id));
  };

  // A walk of a crop without an assigned calibration has no estimate: 404, as nothing is there.
  const estimate = async (req: Request<{ id: string }>, res: Response) => {
    const walk = await service.getWalkFor(ctx.db, contextOf(req), req.params.id);
    if (!walk.estimate) throw new HttpError('not_found', 'This walk has no estimate: no calibration was assigned for its crop when it was stored.');
    res.json(walk.estimate);
  };

  // Refuse before reading the upload; the unread body is let through so the client is not cut off.
  const mayUpload = async (req: Request<{ id: string }>, _res: Response, next: (err?: unknown) => void) => {
    try {
      await service.checkPhotoUpload(ctx.db, contextOf(req), req.params.id);
      next();
    } catch (err) {
      req.resume();
      throw err;
    }
  };

  const addPhoto = async (req: Request<{ id: string }>, res: Response) => {
    if (!req.file) throw new HttpError('invalid', 'Attach the photo in the field "photo".', { photo: 'Attach a photo.' });
    const { stop } = req.body as z.infer<typeof photoFieldsSchema>;
    res.status(201).json(await service.savePhoto(ctx.db, ctx.files, contextOf(req), req.params.id, stop, req.file.buffer));
  };

  const servePhoto = async (req: Request<{ id: string; photoId: string }>, res: Response) => {
    const file = await service.photoFile(ctx.db, ctx.files, contextOf(req), req.params.id, req.params.photoId);
    res.set({ 'Content-Type': file.contentType, 'Content-Length': String(file.size), 'Cache-Control': 'no-store' });
    // A phone that goes away mid-download is no server error; a failure before the first byte is.
    await pipeline(file.body, res).catch((err) => {
      if (!res.headersSent) throw err;
    });
  };

  const submit = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await service.submitWalk(ctx.db, contextOf(req), req.params.id));
  };
  const approve = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await service.reviewWalk(ctx.db, contextOf(req), req.params.id, { approve: true }));
  };
  const reject = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await service.reviewWalk(ctx.db, contextOf(req), req.params.id, { approve: false, reason: req.body.reason }));
  };
  const waive = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await service.waiveOwnReview(ctx.db, contextOf(req), req.params.id, req.body.reason));
  };

  router.get('/', can('walks.read'), validateQuery(listSchema), list);
  router.post('/', walkers, validateBody(walkCreateSchema), create);
  router.get('/:id', can('walks.read'), show);
  router.get('/:id/estimate', can('walks.read'), estimate);
  router.post('/:id/photos', walkers, mayUpload, photoUpload, validateBody(photoFieldsSchema), addPhoto);
  router.get('/:id/photos/:photoId', can('walks.read'), servePhoto);
  router.post('/:id/submit', walkers, submit);
  router.post('/:id/approve', reviewers, approve);
  router.post('/:id/reject', reviewers, validateBody(walkRejectSchema), reject);
  router.post('/:id/own-review-waiver', can('walks.waiveOwnReview'), validateBody(ownReviewWaiverSchema), waive);
  return router;
}
