import type { Router } from 'express';
import { z } from 'zod';
import { allow } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { MailLog, type MailAttachmentRef } from '../../entities/mail-log.js';
import { audit, auditListRead } from '../../lib/audit.js';
import { conflict, notFound } from '../../lib/errors.js';
import { nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { outboxListQuerySchema } from './outbox.schemas.js';

const idParams = z.object({ id: uuidParam });

const summary = (m: MailLog) => ({
  id: m.id,
  to: m.to,
  subject: m.subject,
  state: m.state,
  attempts: m.attempts,
  nextAttemptAt: m.state === 'pending' ? m.nextAttemptAt : null,
  sentAt: m.sentAt,
  lastError: m.lastError,
  relatedType: m.relatedType,
  relatedId: m.relatedId,
  patientId: m.patientId,
  createdAt: m.createdAt,
  attachments: (JSON.parse(m.attachments) as MailAttachmentRef[]).map((a) => ({ filename: a.filename, contentType: a.contentType })),
});

/** The outbox page for admins: what the app queued and sent, and a way to queue a failed mail again. */
export function registerOutboxRoutes(r: Router, { db, mailer }: Deps): void {
  const mails = db.getRepository(MailLog);

  const list = validate({ query: outboxListQuerySchema });
  r.get('/api/outbox', allow('admin'), list, async (req, res) => {
    const { query } = parsed(req, list);
    const [rows, total] = await mails.findAndCount({
      where: query.state ? { state: query.state } : {},
      order: { createdAt: 'DESC' },
      skip: (query.page - 1) * query.pageSize,
      take: query.pageSize,
    });
    await auditListRead(db, req, 'outbox', { state: query.state ?? null, page: query.page });
    res.json({ items: rows.map(summary), total, page: query.page, pageSize: query.pageSize });
  });

  const one = validate({ params: idParams });
  r.get('/api/outbox/:id', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const m = await mails.findOneBy({ id: params.id });
    if (!m) throw notFound('Mail');
    await audit(db, req, { action: 'mail.view', patientId: m.patientId, targetType: 'mail', targetId: m.id });
    res.json({ ...summary(m), text: m.text, html: m.html });
  });

  r.post('/api/outbox/:id/retry', allow('admin'), one, async (req, res) => {
    const { params } = parsed(req, one);
    const result = await mails.update({ id: params.id, state: 'failed' }, { state: 'pending', nextAttemptAt: nowIso(), attempts: 0 });
    if (result.affected !== 1) {
      if (!(await mails.existsBy({ id: params.id }))) throw notFound('Mail');
      throw conflict('Only a mail that failed for good can be queued again.', undefined, 'MAIL_NOT_FAILED');
    }
    await audit(db, req, { action: 'mail.retry', targetType: 'mail', targetId: params.id });
    mailer.kick();
    res.json(summary(await mails.findOneByOrFail({ id: params.id })));
  });
}
