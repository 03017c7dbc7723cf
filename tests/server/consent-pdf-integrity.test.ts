import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, binary, demoForms, handOver, signaturePng } from '../helpers/consents.js';

let t: TestApp;
let admin: Client;
let adminEmail: string;
let consentId: string;

beforeAll(async () => {
  t = await makeTestApp();
  const a = await signedIn(t, 'admin');
  admin = a.client;
  adminEmail = a.user.email;
  const forms = await demoForms(t, a.user.id);
  const patient = await createPatient(t.db);
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, patient.id, [forms.photography.id]);
  const signed = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: 'Nadia Testworth', signature: await signaturePng() });
  expect(signed.status).toBe(201);
  consentId = signed.body.consentId;
});
afterAll(() => t.close());

describe('consent PDF served against its stored hash', () => {
  it('serves an unaltered PDF', async () => {
    const res = await binary(admin.get(`/api/consents/${consentId}/pdf`));
    expect(res.status).toBe(200);
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
  });

  it('refuses a PDF whose stored bytes were altered, with a clear error and one alert to the admins', async () => {
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: consentId });
    const original = await t.deps.storage.get(record.pdfKey);
    const altered = Buffer.concat([original, Buffer.from('\n% edited later\n')]);
    await t.deps.storage.put(record.pdfKey, altered, 'application/pdf');
    for (let i = 0; i < 2; i += 1) {
      const res = await admin.get(`/api/consents/${consentId}/pdf`);
      expect(res.status).toBe(409);
      expect(res.headers['content-type']).toMatch(/json/);
      expect(res.body.error.code).toBe('DOCUMENT_ALTERED');
      expect(res.body.error.message).toMatch(/does not match/);
      expect(res.body.error.details).toMatchObject({ expected: record.pdfSha256 });
    }
    const alerts = await t.db.getRepository(MailLog).findBy({ relatedType: 'consent-pdf-altered', relatedId: consentId });
    expect(alerts.map((m) => m.to)).toEqual([adminEmail]);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'consent.pdf_altered', targetId: consentId })).toBe(2);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'consent.pdf_view', targetId: consentId })).toBe(1);
  });
});
