import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { Reminder } from '../../server/entities/reminder.js';
import { createReminderScheduler } from '../../server/features/reminders/scheduler.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { createProducts, createVisit } from '../helpers/treatments.js';
import type { Patient } from '../../server/entities/patient.js';
import type { User } from '../../server/entities/user.js';

let t: TestApp;
let prac: Client;
let coord: Client;
let practitioner: User;
let products: Awaited<ReturnType<typeof createProducts>>;

beforeAll(async () => {
  t = await makeTestApp();
  const admin = (await signedIn(t, 'admin')).client;
  ({ client: prac, user: practitioner } = await signedIn(t, 'practitioner'));
  coord = (await signedIn(t, 'coordinator')).client;
  products = await createProducts(admin);
});
afterAll(() => t.close());

const scheduler = () => createReminderScheduler({ db: t.db, config: t.config, logger: t.deps.logger, mailer: t.deps.mailer });

/** Records a 0.8 mL filler treatment (no screening on file) and returns its reminders by kind. */
async function treat(patient: Patient, treatedAt: string, extra: Record<string, unknown> = {}) {
  const visit = await createVisit(prac, patient.id, practitioner.id, treatedAt);
  const res = await prac.put(`/api/visits/${visit.id}/treatment`).send({
    treatedAt,
    lines: [{ productId: products.soft.id, unit: 'mL', lotNumber: 'RM-100', expiryDate: '2099-12-31', doses: [{ zone: 'upper-body', amount: 0.3 }, { zone: 'lower-body', amount: 0.5 }] }],
    ...extra,
  });
  if (res.status !== 201) throw new Error(`${res.status} ${JSON.stringify(res.body)}`);
  type Due = { id: string; kind: string; dueOn: string; dueAt: string };
  const byKind = Object.fromEntries((res.body.reminders as Due[]).map((r) => [r.kind, r]));
  return { visit, review: byKind.review, maintenance: byKind.maintenance };
}

const mailsTo = async (to: string) => (await t.mails()).filter((m) => m.to && !Array.isArray(m.to) && m.to.text.includes(to));

describe('reminder due dates', () => {
  it('follows the treatment date: review after 14 days, maintenance after 6 months, at 09:00 clinic time', async () => {
    // Review at 2–4 weeks; HA lip filler lasts about 6–9 months, so maintenance is planned at 6 (FACTS 17, common practice).
    const { review, maintenance } = await treat(await createPatient(t.db), '2025-03-03T10:00:00Z');
    expect(review).toMatchObject({ dueOn: '2025-03-17', dueAt: '2025-03-17T09:00:00.000Z' });
    // 3 September falls in British Summer Time (UTC+1): 09:00 in London is 08:00 UTC.
    expect(maintenance).toMatchObject({ dueOn: '2025-09-03', dueAt: '2025-09-03T08:00:00.000Z' });
  });

  it('takes a chosen review interval within 2–4 weeks and a chosen maintenance interval', async () => {
    const { review, maintenance } = await treat(await createPatient(t.db), '2025-03-03T10:00:00Z', { reviewAfterDays: 28, maintenanceAfterMonths: 9 });
    expect(review.dueOn).toBe('2025-03-31');
    expect(maintenance.dueOn).toBe('2025-12-03');
  });

  it('uses the configured defaults', async () => {
    const other = await makeTestApp({ TWINFRAME_REVIEW_DAYS: '21', TWINFRAME_MAINTENANCE_MONTHS: '9', TWINFRAME_TIME_ZONE: 'UTC' });
    try {
      const admin = (await signedIn(other, 'admin')).client;
      const { client, user } = await signedIn(other, 'practitioner');
      const p = await createProducts(admin);
      const patient = await createPatient(other.db);
      const visit = await createVisit(client, patient.id, user.id, '2025-03-03T10:00:00Z');
      const res = await client.put(`/api/visits/${visit.id}/treatment`).send({ treatedAt: '2025-03-03T10:00:00Z', lines: [{ productId: p.soft.id, unit: 'mL', doses: [{ zone: 'upper-body', amount: 0.5 }] }] });
      expect(res.body.reminders.map((r: { dueAt: string }) => r.dueAt)).toEqual(['2025-03-24T09:00:00.000Z', '2025-12-03T09:00:00.000Z']);
    } finally {
      await other.close();
    }
  });
});

describe('clinic settings', () => {
  it("take the admin's review and maintenance intervals over the defaults", async () => {
    const admin = (await signedIn(t, 'admin')).client;
    expect((await admin.patch('/api/settings').send({ reviewReminderDays: 21, maintenanceReminderMonths: 9 })).status).toBe(200);
    try {
      const { review, maintenance } = await treat(await createPatient(t.db), '2025-03-10T10:00:00Z');
      expect(review.dueOn).toBe('2025-03-31');
      expect(maintenance.dueOn).toBe('2025-12-10');
    } finally {
      await admin.patch('/api/settings').send({ reviewReminderDays: 14, maintenanceReminderMonths: 6 });
    }
  });
});

describe('sending', () => {
  it('queues a due reminder once, even after a restart, and the mail reads right', async () => {
    const patient = await createPatient(t.db, { firstName: 'Orla', lastName: 'Pennifold', email: 'orla.pennifold@mail.example' });
    const { review, maintenance } = await treat(patient, '2025-02-03T10:00:00Z');
    const first = scheduler();
    expect(await first.runOnce(new Date('2025-02-17T08:59:00Z'))).toBe(0);
    expect(await first.runOnce(new Date('2025-02-17T09:05:00Z'))).toBe(1);
    await first.stop();
    // A restarted server (or a second instance) finds nothing left to send.
    const second = scheduler();
    expect(await second.runOnce(new Date('2025-02-17T09:10:00Z'))).toBe(0);
    expect(await second.runOnce(new Date('2025-02-18T09:10:00Z'))).toBe(0);
    await t.deps.mailer.runOnce();

    const mails = await mailsTo('orla.pennifold@mail.example');
    expect(mails).toHaveLength(1);
    const [mail] = mails;
    expect(mail.subject).toBe('Time for your review at Linden Row Aesthetics');
    expect(mail.text).toContain('Dear Orla,');
    expect(mail.text).toContain('treatment on 3 February 2025');
    // Nothing clinical in an e-mail: no product, lot or amounts.
    expect(mail.text).not.toMatch(/HA filler|RM-100|mL/);
    const row = await t.db.getRepository(Reminder).findOneByOrFail({ id: review.id });
    expect(row.state).toBe('sent');
    expect((await t.db.getRepository(MailLog).findOneByOrFail({ id: row.mailId! })).state).toBe('sent');
    expect((await t.db.getRepository(Reminder).findOneByOrFail({ id: maintenance.id })).state).toBe('scheduled');

    // Six months on (3 August, in BST), the maintenance mail goes out, once.
    expect(await second.runOnce(new Date('2025-08-03T08:01:00Z'))).toBe(1);
    expect(await scheduler().runOnce(new Date('2025-08-03T08:02:00Z'))).toBe(0);
    await t.deps.mailer.runOnce();
    const after = await mailsTo('orla.pennifold@mail.example');
    expect(after.map((m) => m.subject)).toEqual(['Time for your review at Linden Row Aesthetics', 'Planning your next appointment at Linden Row Aesthetics']);
  });

  it('never changes a sent reminder afterwards', async () => {
    const { review } = await treat(await createPatient(t.db, { email: 'fixed@mail.example' }), '2025-04-01T10:00:00Z');
    await scheduler().runOnce(new Date('2025-04-15T10:00:00Z'));
    const res = await coord.post(`/api/reminders/${review.id}/cancel`).send({ reason: 'Booked already' });
    expect(res.status).toBe(409);
    await expect(t.db.getRepository(Reminder).update({ id: review.id }, { state: 'scheduled' })).rejects.toThrow(/sent reminder cannot change/);
  });

  it('never sends a cancelled reminder, and logs who cancelled it', async () => {
    const patient = await createPatient(t.db, { email: 'cancelled@mail.example' });
    const { review } = await treat(patient, '2025-05-01T10:00:00Z');
    const res = await coord.post(`/api/reminders/${review.id}/cancel`).send({ reason: 'Patient booked the review at the desk.' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ state: 'cancelled', cancelReason: 'Patient booked the review at the desk.' });
    expect(await scheduler().runOnce(new Date('2025-05-15T10:00:00Z'))).toBe(0);
    await t.deps.mailer.runOnce();
    expect(await mailsTo('cancelled@mail.example')).toHaveLength(0);
    expect((await coord.post(`/api/reminders/${review.id}/cancel`).send({ reason: 'again' })).status).toBe(409);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'reminder.cancel', targetId: review.id })).toBe(1);
    expect((await coord.post(`/api/reminders/${review.id}/cancel`).send({ reason: '' })).status).toBe(400);
  });

  it('cancels instead of sending when there is no address or the date is long past', async () => {
    const noMail = await treat(await createPatient(t.db, { email: null }), '2025-06-02T10:00:00Z');
    const late = await treat(await createPatient(t.db, { email: 'late@mail.example' }), '2025-06-02T10:00:00Z');
    // Eight days after the review date (the server was off for a week and more).
    expect(await scheduler().runOnce(new Date('2025-06-24T10:00:00Z'))).toBe(0);
    const rows = await t.db.getRepository(Reminder).findBy([{ id: noMail.review.id }, { id: late.review.id }]);
    expect(rows.map((r) => r.state)).toEqual(['cancelled', 'cancelled']);
    expect(rows.find((r) => r.id === noMail.review.id)!.cancelReason).toMatch(/no e-mail address/);
    expect(rows.find((r) => r.id === late.review.id)!.cancelReason).toMatch(/past its date/);
    await t.deps.mailer.runOnce();
    expect(await mailsTo('late@mail.example')).toHaveLength(0);
  });

  it('hands the reminder to the outbox even while SMTP is down, and the outbox delivers it later', async () => {
    const patient = await createPatient(t.db, { email: 'retry@mail.example' });
    const { review } = await treat(patient, '2025-07-01T10:00:00Z');
    await t.stopSmtp();
    try {
      expect(await scheduler().runOnce(new Date('2025-07-15T09:30:00Z'))).toBe(1);
      await t.deps.mailer.runOnce();
      const row = await t.db.getRepository(Reminder).findOneByOrFail({ id: review.id });
      expect((await t.db.getRepository(MailLog).findOneByOrFail({ id: row.mailId! })).state).toBe('pending');
    } finally {
      await t.startSmtp();
    }
    await t.deps.mailer.runOnce(new Date(Date.now() + 60 * 60_000));
    expect(await mailsTo('retry@mail.example')).toHaveLength(1);
  });

  it('stops its timer cleanly', async () => {
    const s = createReminderScheduler({ db: t.db, config: t.config, logger: t.deps.logger, mailer: t.deps.mailer, options: { pollMs: 10 } });
    s.start();
    await new Promise((r) => setTimeout(r, 30));
    await s.stop();
  });
});

describe('listing', () => {
  it('shows staff the reminders in a date range without treatment details', async () => {
    const patient = await createPatient(t.db, { firstName: 'Wren', email: 'wren@mail.example' });
    const { review } = await treat(patient, '2025-10-01T10:00:00Z');
    const res = await coord.get('/api/reminders?from=2025-10-15&to=2025-10-15');
    expect(res.status).toBe(200);
    const mine = res.body.reminders.find((r: { id: string }) => r.id === review.id);
    expect(mine).toMatchObject({ kind: 'review', dueOn: '2025-10-15', state: 'scheduled', patient: { firstName: 'Wren', hasEmail: true } });
    expect(JSON.stringify(res.body)).not.toMatch(/RM-100|upper-body|lines/);
    expect((await coord.get(`/api/patients/${patient.id}/reminders`)).body).toHaveLength(2);
    expect((await coord.get('/api/reminders?from=2025-10-15&to=2025-10-01')).status).toBe(400);
    expect((await coord.get('/api/reminders?state=lost')).status).toBe(400);
  });
});
