import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailLog } from '../../server/entities/mail-log.js';
import { backoffMs, createMailer, queueMail } from '../../server/mail/outbox.js';
import { createSmtpTransport } from '../../server/mail/transport.js';
import { makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const later = (ms: number) => new Date(Date.now() + ms);

describe('mail outbox', () => {
  it('doubles the retry delay after each failure, up to the cap', () => {
    const o = { baseDelayMs: 1000, maxDelayMs: 10_000 };
    expect([1, 2, 3, 4, 5, 6].map((a) => backoffMs(a, o))).toEqual([1000, 2000, 4000, 8000, 10_000, 10_000]);
  });

  it('sends a queued mail with its attachment read from object storage', async () => {
    await t.deps.storage.put('mail-test/a.pdf', Buffer.from('%PDF-1.7 test'), 'application/pdf');
    const row = await queueMail(t.db, {
      to: 'patient-a@mail.example',
      subject: 'Your signed form',
      text: 'Attached.',
      attachments: [{ key: 'mail-test/a.pdf', filename: 'form.pdf', contentType: 'application/pdf' }],
    });
    const before = (await t.mails()).length;
    expect(await t.deps.mailer.runOnce()).toBe(1);
    const mails = await t.mails();
    expect(mails).toHaveLength(before + 1);
    const m = mails.at(-1)!;
    expect(m.to && !Array.isArray(m.to) ? m.to.value[0].address : null).toBe('patient-a@mail.example');
    expect(m.subject).toBe('Your signed form');
    expect(m.attachments.map((a) => [a.filename, a.contentType, a.content.toString()])).toEqual([['form.pdf', 'application/pdf', '%PDF-1.7 test']]);
    const saved = await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id });
    expect(saved.state).toBe('sent');
    expect(saved.sentAt).not.toBeNull();
    expect(saved.attempts).toBe(1);
  });

  it('keeps a mail pending while SMTP is down and delivers it once after a restart', async () => {
    await t.stopSmtp();
    const row = await queueMail(t.db, { to: 'patient-b@mail.example', subject: 'Queued while down', text: 'Hello.' });
    expect(await t.deps.mailer.runOnce()).toBe(0);
    let saved = await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id });
    expect(saved.state).toBe('pending');
    expect(saved.attempts).toBe(1);
    expect(saved.lastError).toMatch(/ECONNREFUSED|connect/i);
    expect(Date.parse(saved.nextAttemptAt)).toBeGreaterThan(Date.now());

    // Not due yet: a pass now does not even try.
    expect(await t.deps.mailer.runOnce()).toBe(0);
    expect((await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id })).attempts).toBe(1);

    await t.startSmtp();
    expect(await t.deps.mailer.runOnce(later(backoffMs(1) + 1000))).toBe(1);
    expect(await t.deps.mailer.runOnce(later(24 * 3600_000))).toBe(0);
    saved = await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id });
    expect(saved.state).toBe('sent');
    expect(saved.attempts).toBe(2);
    expect((await t.mails()).filter((m) => m.subject === 'Queued while down')).toHaveLength(1);
  });

  it('sends each mail once when several workers race for the same outbox', async () => {
    const workers = [0, 1, 2].map(() =>
      createMailer({ db: t.db, storage: t.deps.storage, transport: createSmtpTransport(t.config.smtp), from: t.config.smtp.from, logger: t.deps.logger }),
    );
    const subjects = ['Race 1', 'Race 2', 'Race 3', 'Race 4'];
    for (const subject of subjects) await queueMail(t.db, { to: 'race@mail.example', subject, text: 'x' });
    const counts = await Promise.all(workers.map((w) => w.runOnce()));
    expect(counts.reduce((a, b) => a + b, 0)).toBe(subjects.length);
    const delivered = (await t.mails()).filter((m) => m.subject?.startsWith('Race '));
    expect(delivered.map((m) => m.subject).sort()).toEqual(subjects);
  });

  it('lets another worker take over a mail whose claim has lapsed (a worker died mid-send)', async () => {
    const row = await queueMail(t.db, { to: 'lapsed@mail.example', subject: 'Lapsed claim', text: 'x' });
    await t.db.getRepository(MailLog).update({ id: row.id }, { state: 'sending', claimToken: 'dead-worker', claimedUntil: new Date(Date.now() + 60_000).toISOString(), attempts: 1 });
    expect(await t.deps.mailer.runOnce()).toBe(0);
    expect(await t.deps.mailer.runOnce(later(120_000))).toBe(1);
    expect((await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id })).state).toBe('sent');
  });

  it('marks a mail failed after the last attempt, and an admin can queue it again', async () => {
    const mailer = createMailer({
      db: t.db,
      storage: t.deps.storage,
      transport: { send: () => Promise.reject(new Error('550 mailbox unavailable')) },
      from: t.config.smtp.from,
      logger: t.deps.logger,
      options: { maxAttempts: 2 },
    });
    const row = await queueMail(t.db, { to: 'bounce@mail.example', subject: 'Will fail', text: 'x' });
    await mailer.runOnce();
    await mailer.runOnce(later(3600_000));
    const saved = await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id });
    expect(saved.state).toBe('failed');
    expect(saved.lastError).toBe('550 mailbox unavailable');

    const { client: admin } = await signedIn(t, 'admin');
    const list = await admin.get('/api/outbox?state=failed');
    expect(list.status).toBe(200);
    expect(list.body.items.map((m: { id: string }) => m.id)).toContain(row.id);
    const retry = await admin.post(`/api/outbox/${row.id}/retry`).send({});
    expect(retry.status).toBe(200);
    await t.deps.mailer.idle();
    expect((await t.db.getRepository(MailLog).findOneByOrFail({ id: row.id })).state).toBe('sent');
    const again = await admin.post(`/api/outbox/${row.id}/retry`).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('MAIL_NOT_FAILED');
  });

  it('shows the outbox to admins only', async () => {
    const { client: admin } = await signedIn(t, 'admin');
    const list = await admin.get('/api/outbox');
    expect(list.status).toBe(200);
    const sent = list.body.items.find((m: { subject: string }) => m.subject === 'Your signed form');
    expect(sent).toMatchObject({ state: 'sent', to: 'patient-a@mail.example', attachments: [{ filename: 'form.pdf' }] });
    const one = await admin.get(`/api/outbox/${sent.id}`);
    expect(one.body.text).toBe('Attached.');
    const { client: practitioner } = await signedIn(t, 'practitioner');
    expect((await practitioner.get('/api/outbox')).status).toBe(403);
  });
});
