import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { inOrganisation, nowIso } from '../platform/scope';
import { jsonValue } from '../platform/column-values';

export interface OutboxMessage {
  id: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  raw: string | null;
  attachments: { filename: string; contentType: string; size: number }[];
  status: 'captured' | 'sent' | 'failed';
  error: string | null;
  createdAt: string;
}

interface OutboxRow {
  id: string;
  to_address: string;
  subject: string;
  text_body: string;
  html_body: string | null;
  raw: string | null;
  attachments: string | OutboxMessage['attachments'] | null;
  status: OutboxMessage['status'];
  error: string | null;
  created_at: string;
}

const toMessage = (r: OutboxRow): OutboxMessage => ({
  id: r.id,
  to: r.to_address,
  subject: r.subject,
  text: r.text_body,
  html: r.html_body,
  raw: r.raw,
  attachments: jsonValue<OutboxMessage['attachments']>(r.attachments) ?? [],
  status: r.status,
  error: r.error,
  createdAt: r.created_at,
});

export async function insertOutboxMessage(
  db: Knex,
  organisationId: string | null,
  m: Omit<OutboxMessage, 'id' | 'createdAt'>,
): Promise<string> {
  const id = randomUUID();
  await db('mail_outbox').insert({
    id,
    organisation_id: organisationId,
    to_address: m.to,
    subject: m.subject,
    text_body: m.text,
    html_body: m.html,
    raw: m.raw,
    attachments: JSON.stringify(m.attachments),
    status: m.status,
    error: m.error,
    created_at: nowIso(),
  });
  return id;
}

export async function listOutbox(
  db: Knex,
  organisationId: string,
  { limit, offset }: { limit: number; offset: number },
): Promise<{ items: OutboxMessage[]; total: number }> {
  const [rows, count] = await Promise.all([
    inOrganisation(db, 'mail_outbox', organisationId).orderBy('created_at', 'desc').limit(limit).offset(offset),
    inOrganisation(db, 'mail_outbox', organisationId).count({ n: '*' }).first(),
  ]);
  return { items: (rows as OutboxRow[]).map(toMessage), total: Number(count?.n ?? 0) };
}

export async function getOutboxMessage(db: Knex, organisationId: string, id: string): Promise<OutboxMessage | undefined> {
  const row: OutboxRow | undefined = await inOrganisation(db, 'mail_outbox', organisationId).where('id', id).first();
  return row && toMessage(row);
}
