import type { Router } from 'express';
import { In } from 'typeorm';
import { z } from 'zod';
import { allow, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { MailLog } from '../../entities/mail-log.js';
import { Patient } from '../../entities/patient.js';
import { Reminder, REMINDER_STATES } from '../../entities/reminder.js';
import { audit, auditListRead, auditPatientRead } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { addDays, dayIn, daysBetween, nowIso } from '../../lib/time.js';
import { getSettings } from '../settings/settings.service.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';

const idParams = z.object({ id: uuidParam });
const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.');
const listQuery = z
  .object({ from: day.optional(), to: day.optional(), state: z.enum(REMINDER_STATES, { message: 'State is scheduled, sent or cancelled.' }).optional() })
  .strict();
const cancelSchema = z.object({ reason: z.string().trim().min(1, 'Say why the reminder is cancelled.').max(300, 'Use at most 300 characters.') }).strict();

/** A reminder as staff see it: who, what kind, when, and whether its mail went out. No treatment details. */
async function reminderViews(db: Deps['db'], rows: Reminder[]) {
  const patients = rows.length ? await db.getRepository(Patient).findBy({ id: In([...new Set(rows.map((r) => r.patientId))]) }) : [];
  const mailIds = rows.map((r) => r.mailId).filter((x): x is string => Boolean(x));
  const mails = mailIds.length ? await db.getRepository(MailLog).findBy({ id: In(mailIds) }) : [];
  return rows.map((r) => {
    const p = patients.find((x) => x.id === r.patientId);
    const m = mails.find((x) => x.id === r.mailId);
    return {
      id: r.id,
      kind: r.kind,
      dueOn: r.dueOn,
      dueAt: r.dueAt,
      state: r.state,
      sentAt: r.sentAt,
      cancelledAt: r.cancelledAt,
      cancelReason: r.cancelReason,
      visitId: r.visitId,
      patient: p ? { id: p.id, code: p.code, firstName: p.firstName, lastName: p.lastName, hasEmail: Boolean(p.email) } : null,
      mail: m ? { state: m.state, sentAt: m.sentAt } : null,
    };
  });
}

export function registerReminderRoutes(r: Router, { db, config }: Deps): void {
  const reminders = db.getRepository(Reminder);

  const list = validate({ query: listQuery });
  r.get('/api/reminders', allow(...STAFF), list, async (req, res) => {
    const { query } = parsed(req, list);
    const from = query.from ?? dayIn((await getSettings(db, config)).timeZone);
    const to = query.to ?? addDays(from, 30);
    if (daysBetween(from, to) < 0 || daysBetween(from, to) > 366) throw badRequest('Choose a range of at most a year, "from" before "to".', [{ path: 'to', message: 'At most 366 days after "from".' }]);
    const qb = reminders.createQueryBuilder('r').where('r.dueOn >= :from AND r.dueOn <= :to', { from, to });
    if (query.state) qb.andWhere('r.state = :state', { state: query.state });
    const rows = await qb.orderBy('r.dueAt', 'ASC').getMany();
    await auditListRead(db, req, 'reminders', { from, to });
    res.json({ from, to, reminders: await reminderViews(db, rows) });
  });

  const one = validate({ params: idParams });
  r.get('/api/patients/:id/reminders', allow(...STAFF), one, async (req, res) => {
    const { params } = parsed(req, one);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await reminders.find({ where: { patientId: params.id }, order: { dueAt: 'ASC' } });
    await auditPatientRead(db, req, { action: 'reminder.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(await reminderViews(db, rows));
  });

  const cancel = validate({ params: idParams, body: cancelSchema });
  r.post('/api/reminders/:id/cancel', allow(...STAFF), cancel, async (req, res) => {
    const { params, body } = parsed(req, cancel);
    const row = await reminders.findOneBy({ id: params.id });
    if (!row) throw notFound('Reminder');
    await db.transaction(async (tx) => {
      // Conditional: a scheduler may take the reminder at the same moment; then it stays sent.
      const done = await tx.getRepository(Reminder).update({ id: row.id, state: 'scheduled' }, { state: 'cancelled', cancelledAt: nowIso(), cancelledById: req.user!.id, cancelReason: body.reason });
      if (done.affected !== 1) {
        const now = await tx.getRepository(Reminder).findOneByOrFail({ id: row.id });
        throw conflict(now.state === 'sent' ? 'This reminder has already been sent.' : 'This reminder is already cancelled.', { state: now.state }, 'REMINDER_NOT_SCHEDULED');
      }
      await audit(tx, req, { action: 'reminder.cancel', patientId: row.patientId, targetType: 'reminder', targetId: row.id, details: { kind: row.kind, dueOn: row.dueOn } });
    });
    const [view] = await reminderViews(db, [await reminders.findOneByOrFail({ id: row.id })]);
    res.json(view);
  });
}
