import { Router } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { keepUncompressed } from '../platform/compress';
import { getOutboxMessage, listOutbox } from './service';

const PAGE = 50;
const pageQuery = z.object({ page: z.coerce.number().int().min(1).default(1).catch(1) });

/** Admin only: every message Crowntip sent or captured for this organisation. */
export function outboxPages(ctx: AppContext): Router {
  const router = Router();
  router.use(can('mail.outbox'));

  router.get('/', async (req, res) => {
    const { page } = pageQuery.parse(req.query);
    const { items, total } = await listOutbox(ctx.db, contextOf(req).organisationId, { limit: PAGE, offset: (page - 1) * PAGE });
    res.render('admin/outbox', {
      title: 'Outbox',
      items,
      total,
      page,
      pages: Math.max(1, Math.ceil(total / PAGE)),
      capturing: !ctx.config.SMTP_URL,
    });
  });

  // A captured message shows its live one-time link: never compressed (README, "Speed", BREACH).
  router.get('/:id', keepUncompressed);
  router.get('/:id', async (req, res) => {
    const message = await getOutboxMessage(ctx.db, contextOf(req).organisationId, req.params.id);
    if (!message) throw new HttpError('not_found');
    // Links in the text become clickable so an invitation can be followed from here in development.
    res.render('admin/outbox-message', {
      title: message.subject,
      message,
      links: message.text.match(/https?:\/\/\S+/g) ?? [],
      capturing: message.status === 'captured',
    });
  });

  return router;
}
