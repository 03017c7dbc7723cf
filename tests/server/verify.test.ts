import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { PDFDocument } from 'pdf-lib';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { sha256Hex } from '../../server/features/consents/hash.js';
import { CHAINS, rowHashOf } from '../../server/features/integrity/chain.js';
import { VERIFY_MAX_BYTES } from '../../server/features/verify/verify.routes.js';
import { Client, createPatient, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';
import { alterOneByte, answersFor, demoForms, handOver, pdfTool, signaturePng } from '../helpers/consents.js';

let t: TestApp;
let anonymous: Client;
let staff: Client;
const ids: Record<'photography' | 'showcase', string> = { photography: '', showcase: '' };
let titles: Record<'photography' | 'showcase', string>;

const checkPdf = (c: Client, bytes: Buffer, name = 'consent.pdf', contentType = 'application/pdf') => c.post('/api/verify/pdf').attach('pdf', bytes, { filename: name, contentType });
const storedPdf = async (id: string) => t.deps.storage.get((await t.db.getRepository(ConsentRecord).findOneByOrFail({ id })).pdfKey);
const checks = () => t.db.getRepository(AuditEvent).findBy({ action: 'verify.check' });

beforeAll(async () => {
  t = await makeTestApp({ TWINFRAME_VERIFY_LIMIT: '40' });
  const admin = await signedIn(t, 'admin');
  staff = admin.client;
  const forms = await demoForms(t, admin.user.id);
  titles = { photography: forms.photography.title, showcase: forms.showcase.title };
  const patient = await createPatient(t.db, { firstName: 'Oona', lastName: 'Verity', email: 'oona@mail.example' });
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, patient.id, [forms.photography.id, forms.showcase.id]);
  for (const k of ['photography', 'showcase'] as const) {
    expect((await tablet.post(`/api/handover/forms/${forms[k].id}/shown`).send({})).status).toBe(200);
    const res = await tablet.post(`/api/handover/forms/${forms[k].id}/sign`).send({
      answers: answersFor(forms[k]),
      signerName: 'Oona Verity',
      signature: await signaturePng(),
      ...(k === 'showcase' ? { channels: ['print'], crop: 'face' } : {}),
    });
    expect(res.status).toBe(201);
    ids[k] = res.body.consentId;
  }
  expect((await admin.client.post(`/api/consents/${ids.showcase}/withdraw`).send({ reason: 'No longer wishes', date: undefined })).status).toBe(200);
  await t.deps.mailer.runOnce();
  await t.deps.mailer.idle();
  anonymous = new Client(t.app);
  await anonymous.refreshCsrf();
}, 180_000);
afterAll(() => t.close());

describe('the public verify page, as an anonymous caller', () => {
  it('recognises a genuine stored PDF and says only its date, form, version and state', async () => {
    const before = (await checks()).length;
    const res = await checkPdf(anonymous, await storedPdf(ids.photography));
    expect(res.status).toBe(200);
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: ids.photography });
    const day = new Date(record.signedAt).toLocaleDateString('en-CA', { timeZone: 'Europe/London' });
    expect(res.body).toEqual({
      result: 'signed-record',
      sha256: record.pdfSha256,
      signedOn: day,
      form: { title: titles.photography, version: 1 },
      state: 'current',
      withdrawnOn: null,
      message: expect.stringMatching(new RegExp(`^This is the signed consent record of \\d{1,2} \\w+ \\d{4}, form “${titles.photography}” v1, current\\.$`)),
    });
    // Nothing about the patient or the record beyond that.
    expect(JSON.stringify(res.body)).not.toMatch(/Oona|Verity|oona@|LR-|T-/);
    expect(JSON.stringify(res.body)).not.toContain(record.id);
    // Access-logged, as an anonymous caller, naming the record that was checked.
    const logged = await checks();
    expect(logged).toHaveLength(before + 1);
    const entry = logged.find((e) => e.targetId === record.id)!;
    expect(entry).toMatchObject({ actorRole: 'anonymous', actorId: null, targetType: 'consent', patientId: record.patientId });
    expect(JSON.parse(entry.details)).toEqual({ method: 'pdf', result: 'signed-record' });
  });

  it('says a withdrawn consent was withdrawn, and on which day', async () => {
    const res = await checkPdf(anonymous, await storedPdf(ids.showcase));
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: ids.showcase });
    expect(res.body).toMatchObject({ result: 'signed-record', state: 'withdrawn', withdrawnOn: record.withdrawalDate, form: { title: titles.showcase, version: 1 } });
    expect(res.body.message).toMatch(/, withdrawn on \d{1,2} \w+ \d{4}\.$/);
  });

  it('recognises the e-mailed attachment as parsed from the message (mailparser)', async () => {
    const mail = (await t.mails()).find((m) => m.text?.includes(ids.photography) && m.attachments.length === 1)!;
    const res = await checkPdf(anonymous, mail.attachments[0].content, mail.attachments[0].filename);
    expect(res.body.result).toBe('signed-record');
    // FIPS 180-4 SHA-256 of the attachment, as the page reports it, is the value the e-mail states.
    expect(mail.text).toContain(`SHA-256 of the attached PDF: ${res.body.sha256}`);
  });

  it('reports one changed byte, as pdfsig does (ETSI EN 319 142-1 / RFC 5652), and an unrelated PDF, the same way', async () => {
    const tampered = alterOneByte(await storedPdf(ids.photography));
    expect(pdfTool(tampered, 'pdfsig')).toContain('Digest Mismatch');
    const bad = await checkPdf(anonymous, tampered);
    expect(bad.status).toBe(200);
    expect(bad.body).toEqual({ result: 'not-a-record', sha256: sha256Hex(tampered), message: 'This is not a record of this clinic, or it has been altered.' });
    const other = await PDFDocument.create();
    other.addPage().drawText('A letter from somewhere else');
    const unrelated = await checkPdf(anonymous, Buffer.from(await other.save()), 'letter.pdf');
    expect(unrelated.body.result).toBe('not-a-record');
    const logged = (await checks()).filter((e) => JSON.parse(e.details).result === 'not-a-record');
    expect(logged.length).toBeGreaterThanOrEqual(2);
    expect(logged.every((e) => e.targetId === null && e.patientId === null)).toBe(true);
  });

  it('checks a typed hash (spaces and capitals ignored), and refuses text that is not one', async () => {
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: ids.photography });
    const typed = record.pdfSha256.toUpperCase().replace(/(.{8})/g, '$1 ');
    expect((await anonymous.post('/api/verify/hash').send({ sha256: typed })).body).toMatchObject({ result: 'signed-record', state: 'current' });
    expect((await anonymous.post('/api/verify/hash').send({ sha256: 'a'.repeat(64) })).body.result).toBe('not-a-record');
    const wrong = await anonymous.post('/api/verify/hash').send({ sha256: 'not a hash' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.message).toMatch(/64 hexadecimal characters/);
  });

  it('refuses a non-PDF, an oversized and an encrypted file with a clear 4xx, and stores nothing uploaded', async () => {
    const keys = (await t.deps.storage.list('')).length;
    const mails = await t.db.getRepository(MailLog).count();
    const records = await t.db.getRepository(ConsentRecord).count();

    const png = await sharp({ create: { width: 20, height: 20, channels: 3, background: '#fff' } }).png().toBuffer();
    const notPdf = await checkPdf(anonymous, png, 'consent.pdf');
    expect(notPdf.status).toBe(415);
    expect(notPdf.body.error).toMatchObject({ code: 'NOT_PDF', message: expect.stringMatching(/not a PDF/) });

    const big = Buffer.alloc(VERIFY_MAX_BYTES + 1, 0x20);
    big.write('%PDF-1.7\n');
    const tooBig = await checkPdf(anonymous, big);
    expect(tooBig.status).toBe(413);
    expect(tooBig.body.error.code).toBe('FILE_TOO_LARGE');

    // Encrypted with qpdf (AES-256, ISO 32000-2 security handler revision 6).
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-verify-'));
    fs.writeFileSync(path.join(dir, 'in.pdf'), await storedPdf(ids.photography));
    execFileSync('qpdf', ['--encrypt', 'user-pw', 'owner-pw', '256', '--', path.join(dir, 'in.pdf'), path.join(dir, 'out.pdf')]);
    const encrypted = await checkPdf(anonymous, fs.readFileSync(path.join(dir, 'out.pdf')));
    fs.rmSync(dir, { recursive: true, force: true });
    expect(encrypted.status).toBe(422);
    expect(encrypted.body.error).toMatchObject({ code: 'PDF_ENCRYPTED', message: expect.stringMatching(/encrypted/) });

    const none = await anonymous.post('/api/verify/pdf').send({});
    expect(none.status).toBe(400);

    expect((await t.deps.storage.list('')).length).toBe(keys);
    expect(await t.db.getRepository(MailLog).count()).toBe(mails);
    expect(await t.db.getRepository(ConsentRecord).count()).toBe(records);
    const refused = (await checks()).filter((e) => JSON.parse(e.details).result === 'refused').map((e) => JSON.parse(e.details).reason);
    expect(refused).toEqual(expect.arrayContaining(['NOT_PDF', 'PDF_ENCRYPTED', 'NO_FILE']));
  });

  it('no longer vouches for a record whose row was rewritten in the database', async () => {
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: ids.photography });
    const trigger = (await t.db.query(`SELECT sql FROM sqlite_master WHERE type = 'trigger' AND name = 'consent_record_withdraw_once'`))[0].sql as string;
    await t.db.query(`DROP TRIGGER "consent_record_withdraw_once"`);
    const forged = { ...record, signerName: 'Someone Else' };
    await t.db.query(`UPDATE "consent_record" SET "signerName" = ?, "rowHash" = ? WHERE "id" = ?`, [forged.signerName, rowHashOf(CHAINS.consent, record.chainSeq, forged), record.id]);
    try {
      const res = await checkPdf(anonymous, await storedPdf(ids.photography));
      expect(res.body.result).toBe('not-a-record');
      const entry = (await checks()).at(-1)!;
      expect(JSON.parse(entry.details)).toMatchObject({ result: 'not-a-record', integrity: 'broken' });
      // The staff check of the stored copy says the same: the file still hashes right, the record does not hold.
      const internal = await staff.get(`/api/consents/${record.id}/verify`);
      expect(internal.body).toMatchObject({ status: 'altered', checks: { pdf: { ok: true }, chain: { ok: false } } });
    } finally {
      await t.db.query(`UPDATE "consent_record" SET "signerName" = ?, "rowHash" = ? WHERE "id" = ?`, [record.signerName, record.rowHash, record.id]);
      await t.db.query(trigger);
    }
    expect((await checkPdf(anonymous, await storedPdf(ids.photography))).body.result).toBe('signed-record');
  });

  it("publishes the clinic's signing certificate, matching the signer pdfsig names", async () => {
    const res = await anonymous.get('/api/verify/certificate');
    expect(res.status).toBe(200);
    expect(res.body.commonName).toBe('Linden Row Aesthetics');
    expect(res.body.pem).toMatch(/^-----BEGIN CERTIFICATE-----/);
    expect(res.body.fingerprint).toMatch(/^[0-9a-f]{64}$/);
    expect(pdfTool(await storedPdf(ids.photography), 'pdfsig')).toContain(`Signer Certificate Common Name: ${res.body.commonName}`);
  });
});

describe('the verify rate limit', () => {
  it('refuses an address after its limit, on every app instance, and logs the refusal', async () => {
    const limited = await makeTestApp({ TWINFRAME_VERIFY_LIMIT: '3' });
    try {
      const c = new Client(limited.app);
      await c.refreshCsrf();
      for (let i = 0; i < 3; i++) expect((await c.post('/api/verify/hash').send({ sha256: 'b'.repeat(64) })).status).toBe(200);
      const refused = await c.post('/api/verify/hash').send({ sha256: 'b'.repeat(64) });
      expect(refused.status).toBe(429);
      expect(refused.body.error).toMatchObject({ code: 'RATE_LIMITED', message: expect.stringMatching(/Too many checks/) });
      expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
      expect(refused.headers['ratelimit']).toMatch(/remaining=0/);
      // A second app instance on the same database counts the same hits.
      const second = new Client(createApp(limited.deps));
      await second.refreshCsrf();
      expect((await checkPdf(second, Buffer.from('%PDF-1.7\n'))).status).toBe(429);
      expect(await limited.db.getRepository(AuditEvent).countBy({ action: 'verify.limited' })).toBe(2);
      expect(await limited.db.getRepository(AuditEvent).countBy({ action: 'verify.check' })).toBe(3);
    } finally {
      await limited.close();
    }
  });
});
