import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import type { ConsentTemplate } from '../../server/entities/consent-template.js';
import { MailLog } from '../../server/entities/mail-log.js';
import type { Patient } from '../../server/entities/patient.js';
import { onConsentWithdrawn } from '../../server/features/consents/consent-events.js';
import { consentContentSha256 } from '../../server/features/consents/consents.service.js';
import { sha256Hex } from '../../server/features/consents/hash.js';
import { backoffMs } from '../../server/mail/outbox.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { alterOneByte, answersFor, binary, demoForms, handOver, pdfTool, signatureDictionaries, signaturePng } from '../helpers/consents.js';

// Invented patient; the accented name checks that the shipped font covers it in the PDF.
const NAME = { firstName: 'Zoë', lastName: 'Łukasiewicz-Řezníčková' };
const FULL_NAME = `${NAME.firstName} ${NAME.lastName}`;

let t: TestApp;
let forms: Awaited<ReturnType<typeof demoForms>>;
let patient: Patient;
let practitioner: Client;
const signed: Record<string, { consentId: string; template: ConsentTemplate }> = {};

beforeAll(async () => {
  t = await makeTestApp();
  const admin = await signedIn(t, 'admin');
  forms = await demoForms(t, admin.user.id);
  patient = await createPatient(t.db, { ...NAME, email: 'zoe.lr@mail.example', dateOfBirth: '1994-10-09' });
  practitioner = (await signedIn(t, 'practitioner')).client;

  // The patient signs all four forms on the tablet; the screening has two answers that need review.
  const staff = (await signedIn(t, 'practitioner')).client;
  const order = [forms.treatment, forms.photography, forms.showcase, forms.screening];
  const tablet = await handOver(staff, patient.id, order.map((f) => f.id));
  const signature = await signaturePng();
  for (const f of order) {
    expect((await tablet.post(`/api/handover/forms/${f.id}/shown`).send({})).status).toBe(200);
    const body = {
      answers: answersFor(f, f.kind === 'screening' ? { 'cold-sore-history': 'yes', 'blood-thinners': 'yes', medicines: 'none' } : {}),
      signerName: FULL_NAME,
      signature,
      ...(f.kind === 'showcase' ? { channels: ['clinic-website', 'professional-education'], crop: 'lips-only' } : {}),
    };
    const res = await tablet.post(`/api/handover/forms/${f.id}/sign`).send(body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.warnings).toEqual([]);
    signed[f.kind] = { consentId: res.body.consentId, template: f };
    expect(res.body.completed).toBe(f === order[order.length - 1]);
  }
  await t.deps.mailer.idle();
});
afterAll(() => t.close());

describe('signed consent PDFs', () => {
  it('pass qpdf --check and carry the name, version, hash and signature image (poppler)', async () => {
    for (const kind of ['treatment', 'photography', 'showcase', 'screening']) {
      const { consentId } = signed[kind];
      const res = await binary(practitioner.get(`/api/consents/${consentId}/pdf`));
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('application/pdf');
      const pdf = res.body as Buffer;
      // qpdf (Debian package qpdf) checks the file's structure and streams.
      expect(pdfTool(pdf, 'qpdf')).toMatch(/No syntax or stream encoding errors found/);
      const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: consentId });
      expect(sha256Hex(pdf)).toBe(record.pdfSha256);
      // pdftotext (poppler-utils) reads the text back through the embedded subset font.
      const text = pdfTool(pdf, 'pdftotext').replace(/\s+/g, ' ');
      expect(text).toContain(FULL_NAME);
      expect(text).toContain('Form version 1');
      // The footer prints what a reader can check: the record id and the public verify address.
      expect(text).toContain(`Consent record ${consentId}`);
      expect(text).toContain('Check this PDF at http://localhost:8080/verify');
      expect(text).toContain('Linden Row Aesthetics');
      expect(text).toMatch(/Signed: \d{1,2} \w+ \d{4}, \d{2}:\d{2}:\d{2} \(Europe\/London, GMT[+-]\d{2}:\d{2}\)/);
      // Every page carries the footer.
      const pages = (text.match(/Page \d+ of (\d+)/g) ?? []).length;
      expect(pages).toBe(Number(/Page \d+ of (\d+)/.exec(text)![1]));
      // pdfimages (poppler-utils) lists the embedded signature (600×200, with its transparency mask).
      const images = pdfTool(pdf, 'pdfimages');
      expect(images).toMatch(/\bimage\s+600\s+200\b/);
      expect(images).toMatch(/\bsmask\s+600\s+200\b/);
    }
  });

  it('carry the clinic\'s PDF signature, valid by poppler\'s pdfsig, with the signing time and the reason', async () => {
    for (const kind of ['treatment', 'showcase']) {
      const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: signed[kind].consentId });
      const pdf = await t.deps.storage.get(record.pdfKey);
      // A CMS SignedData (RFC 5652) over the file's /ByteRange, the form PAdES (ETSI EN 319 142-1) builds on;
      // pdfsig (poppler-utils) recomputes the digest and checks the signature with the embedded certificate.
      const report = pdfTool(pdf, 'pdfsig');
      expect(report).toContain('Signature Validation: Signature is Valid.');
      expect(report).toContain('Signer Certificate Common Name: Linden Row Aesthetics');
      expect(report).toContain('Signing Hash Algorithm: SHA-256');
      expect(report).toContain('Total document signed');
      // Signing time is the moment of signing (pdfsig prints it in UTC, to the second).
      const at = new Date(record.signedAt);
      const month = at.toLocaleString('en-US', { month: 'short', timeZone: 'UTC' });
      expect(report).toContain(`Signing Time: ${month} ${String(at.getUTCDate()).padStart(2, '0')} ${at.getUTCFullYear()} ${at.toISOString().slice(11, 19)}`);
      // The reason, read back by qpdf as a UTF-16 text string: the accented name survives.
      const [sig] = signatureDictionaries(pdf);
      expect(sig['/Reason']).toBe(`u:Consent of ${FULL_NAME}, form ${signed[kind].template.title} v1`);
      expect(sig['/ContactInfo']).toBe('u:http://localhost:8080/verify');
    }
  });

  it('detects one changed byte: pdfsig reports a digest mismatch, qpdf still reads the file', async () => {
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: signed.treatment.consentId });
    const pdf = await t.deps.storage.get(record.pdfKey);
    const tampered = alterOneByte(pdf);
    // ETSI EN 319 142-1 / RFC 5652: the message digest over the byte range no longer matches the signed attribute.
    expect(pdfTool(tampered, 'pdfsig')).toContain('Signature Validation: Digest Mismatch.');
    expect(pdfTool(tampered, 'qpdf')).toMatch(/No syntax or stream encoding errors found/);
  });

  it('records the answers, channels and crop, and the answers that need review', async () => {
    const showcase = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: signed.showcase.consentId });
    expect(JSON.parse(showcase.channels)).toEqual(['clinic-website', 'professional-education']);
    expect(showcase.crop).toBe('lips-only');
    const text = pdfTool(await t.deps.storage.get(showcase.pdfKey), 'pdftotext').replace(/\s+/g, ' ');
    expect(text).toContain('Clinic website: Yes');
    expect(text).toContain('Social media: No');
    expect(text).toContain('Lips-only crop');
    const screening = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: signed.screening.consentId });
    expect(JSON.parse(screening.flaggedQuestionIds).sort()).toEqual(['blood-thinners', 'cold-sore-history']);
  });

  it('keeps the evidence trail: who started the hand-over, shown and signed times, version, hash, address and browser (FACTS 14)', async () => {
    const res = await practitioner.get(`/api/consents/${signed.treatment.consentId}`);
    expect(res.status).toBe(200);
    const events = res.body.evidence.map((e: { event: string }) => e.event);
    expect(events).toEqual(['handover.started', 'form.shown', 'form.signed']);
    const [started, shown, signedEv] = res.body.evidence;
    expect(started.actorRole).toBe('practitioner');
    expect(started.actorId).not.toBeNull();
    expect(shown.at <= signedEv.at).toBe(true);
    expect(signedEv.ip).toMatch(/127\.0\.0\.1/);
    expect(signedEv.details).toMatchObject({ templateVersion: 1, templateSha256: signed.treatment.template.sha256, pdfSha256: res.body.pdfSha256 });
    expect(res.body).toMatchObject({ templateVersion: 1, templateSha256: signed.treatment.template.sha256, state: 'current', signerName: FULL_NAME, nameMatchesPatient: true });
  });

  it('verifies a stored PDF as valid, and as altered when one byte changes in the store', async () => {
    const id = signed.photography.consentId;
    const ok = await practitioner.get(`/api/consents/${id}/verify`);
    expect(ok.status).toBe(200);
    expect(ok.body.status).toBe('valid');
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id });
    const pdf = await t.deps.storage.get(record.pdfKey);
    const tampered = alterOneByte(pdf);
    await t.deps.storage.put(record.pdfKey, tampered, 'application/pdf');
    const bad = await practitioner.get(`/api/consents/${id}/verify`);
    expect(bad.body.status).toBe('altered');
    expect(bad.body.checks.pdf).toMatchObject({ ok: false, expected: record.pdfSha256, actual: sha256Hex(tampered) });
    expect(bad.body.checks.content.ok).toBe(true);
    await t.deps.storage.put(record.pdfKey, pdf, 'application/pdf');
    expect((await practitioner.get(`/api/consents/${id}/verify`)).body.status).toBe('valid');
  });

  it('e-mails each signed PDF to the patient once, and shows when it was sent', async () => {
    const mails = (await t.mails()).filter((m) => m.to && !Array.isArray(m.to) && m.to.value[0].address === 'zoe.lr@mail.example');
    expect(mails).toHaveLength(4);
    for (const kind of ['treatment', 'photography', 'showcase', 'screening']) {
      const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: signed[kind].consentId });
      const mail = mails.find((m) => m.text?.includes(record.id));
      expect(mail, kind).toBeDefined();
      expect(mail!.attachments).toHaveLength(1);
      expect(mail!.attachments[0].contentType).toBe('application/pdf');
      // FIPS 180-4 SHA-256 of the attachment as mailparser decoded it = the value the e-mail states = the database's.
      const attachment = mail!.attachments[0].content;
      const stated = /SHA-256 of the attached PDF: ([0-9a-f]{64})/.exec(mail!.text ?? '')?.[1];
      expect(sha256Hex(attachment)).toBe(stated);
      expect(stated).toBe(record.pdfSha256);
      expect(mail!.text).toContain('check the PDF at http://localhost:8080/verify');
      expect(pdfTool(attachment, 'pdfsig')).toContain('Signature Validation: Signature is Valid.');
    }
    const list = await practitioner.get(`/api/patients/${patient.id}/consents`);
    expect(list.body).toHaveLength(4);
    for (const c of list.body) {
      expect(c.email.state).toBe('sent');
      expect(c.email.sentAt).not.toBeNull();
    }
  });

  it('shows coordinators the status of every consent but not the clinical screening answers', async () => {
    const { client: desk } = await signedIn(t, 'coordinator');
    const list = await desk.get(`/api/patients/${patient.id}/consents`);
    expect(list.status).toBe(200);
    const screening = list.body.find((c: { kind: string }) => c.kind === 'screening');
    expect(screening).toMatchObject({ state: 'current', canOpenPdf: false, flaggedCount: 2 });
    expect(screening.answers).toBeUndefined();
    expect((await desk.get(`/api/consents/${signed.screening.consentId}/pdf`)).status).toBe(403);
    expect((await binary(desk.get(`/api/consents/${signed.photography.consentId}/pdf`))).status).toBe(200);
    expect((await desk.get(`/api/consents/${signed.screening.consentId}/verify`)).body.status).toBe('valid');
  });
});

describe('immutability', () => {
  it('refuses edits and deletions of a consent record and its evidence at the database level', async () => {
    const id = signed.treatment.consentId;
    await expect(t.db.query(`UPDATE consent_record SET "signerName" = 'Someone Else' WHERE id = ?`, [id])).rejects.toThrow(/immutable/);
    await expect(t.db.query(`UPDATE consent_record SET answers = '{}' WHERE id = ?`, [id])).rejects.toThrow(/immutable/);
    await expect(t.db.query(`DELETE FROM consent_record WHERE id = ?`, [id])).rejects.toThrow(/immutable/);
    await expect(t.db.query(`UPDATE consent_evidence SET ip = '10.0.0.1' WHERE "consentId" = ?`, [id])).rejects.toThrow(/append-only/);
    await expect(t.db.query(`DELETE FROM consent_evidence WHERE "consentId" = ?`, [id])).rejects.toThrow(/append-only/);
    const r = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id });
    expect(consentContentSha256(r)).toBe(r.contentSha256);
  });
});

describe('withdrawal (GDPR Art. 7(3): at any time, as easily as given)', () => {
  it('is one action that adds a fact, keeps the record, and e-mails a confirmation', async () => {
    const seen: string[] = [];
    const off = onConsentWithdrawn(async ({ consent, tx }) => {
      seen.push(consent.id);
      // Listeners run inside the withdrawal's transaction and see the new fact.
      const row = await tx.getRepository(ConsentRecord).findOneByOrFail({ id: consent.id });
      expect(row.withdrawnAt).not.toBeNull();
    });
    const id = signed.showcase.consentId;
    const before = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id });
    const res = await practitioner.post(`/api/consents/${id}/withdraw`).send({ reason: 'Patient asked by phone.' });
    off();
    expect(res.status).toBe(200);
    expect(res.body.state).toBe('withdrawn');
    expect(res.body.withdrawal).toMatchObject({ reason: 'Patient asked by phone.' });
    expect(seen).toEqual([id]);

    const after = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id });
    expect({ ...after, withdrawnAt: null, withdrawnById: null, withdrawalReason: null, withdrawalDate: null }).toEqual(before);
    await expect(t.db.query(`UPDATE consent_record SET "withdrawalReason" = 'changed' WHERE id = ?`, [id])).rejects.toThrow(/immutable/);
    const again = await practitioner.post(`/api/consents/${id}/withdraw`).send({ reason: 'twice' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('ALREADY_WITHDRAWN');

    await t.deps.mailer.idle();
    const confirmation = (await t.mails()).find((m) => m.subject === 'Withdrawal of your showcase consent is recorded');
    expect(confirmation).toBeDefined();
    expect(confirmation!.to && !Array.isArray(confirmation!.to) ? confirmation!.to.value[0].address : '').toBe('zoe.lr@mail.example');
    expect(confirmation!.text).toContain(id);
    expect(confirmation!.text).toContain('clinic website, professional education');
    // A confirmation carries no attachment; the signed copy was sent with the consent itself.
    expect(confirmation!.attachments).toHaveLength(0);
    const view = await practitioner.get(`/api/consents/${id}`);
    expect(view.body.evidence.map((e: { event: string }) => e.event)).toContain('consent.withdrawn');
    expect(view.body.withdrawal.email.state).toBe('sent');
    // The withdrawn record stays verifiable.
    expect((await practitioner.get(`/api/consents/${id}/verify`)).body.status).toBe('valid');
  });

  it('lets the front desk record it too, with the date the patient asked', async () => {
    const { client: desk } = await signedIn(t, 'coordinator');
    const today = new Date().toISOString().slice(0, 10);
    const future = await desk.post(`/api/consents/${signed.photography.consentId}/withdraw`).send({ reason: 'x', date: '2999-01-01' });
    expect(future.status).toBe(400);
    const res = await desk.post(`/api/consents/${signed.photography.consentId}/withdraw`).send({ reason: 'Asked at reception.', date: today });
    expect(res.status).toBe(200);
    expect(res.body.withdrawal.date).toBe(today);
  });

  it('does not withdraw a treatment consent or a screening questionnaire here', async () => {
    const res = await practitioner.post(`/api/consents/${signed.treatment.consentId}/withdraw`).send({ reason: 'x' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('NOT_WITHDRAWABLE');
    const mailsBefore = await t.db.getRepository(MailLog).count();
    expect((await practitioner.post(`/api/consents/${signed.screening.consentId}/withdraw`).send({ reason: 'x' })).status).toBe(409);
    expect(await t.db.getRepository(MailLog).count()).toBe(mailsBefore);
  });
});

describe('e-mail while the SMTP server is down', () => {
  it('saves the consent with its mail pending, then delivers it once after the server is back', async () => {
    await t.stopSmtp();
    const staff = (await signedIn(t, 'practitioner')).client;
    const tablet = await handOver(staff, patient.id, [forms.photography.id]);
    const res = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: FULL_NAME, signature: await signaturePng() });
    expect(res.status).toBe(201);
    await t.deps.mailer.idle();
    const id = res.body.consentId;
    const view = await practitioner.get(`/api/consents/${id}`);
    expect(view.body.email).toMatchObject({ state: 'pending', sentAt: null, attempts: 1 });
    expect(view.body.state).toBe('current');

    await t.startSmtp();
    await t.deps.mailer.runOnce(new Date(Date.now() + backoffMs(1) + 1000));
    await t.deps.mailer.runOnce(new Date(Date.now() + 24 * 3600_000));
    const delivered = (await t.mails()).filter((m) => m.text?.includes(id));
    expect(delivered).toHaveLength(1);
    expect((await practitioner.get(`/api/consents/${id}`)).body.email.state).toBe('sent');
    // The newer photography consent supersedes the withdrawn one.
    const list = await practitioner.get(`/api/patients/${patient.id}/consents`);
    const photo = list.body.filter((c: { kind: string }) => c.kind === 'photography').map((c: { id: string; state: string }) => [c.id, c.state]);
    expect(photo).toEqual([
      [id, 'current'],
      [signed.photography.consentId, 'withdrawn'],
    ]);
  });
});

describe('access log', () => {
  it('logs PDF views, verification and withdrawal', async () => {
    const rows: { action: string }[] = await t.db.query(`SELECT action FROM audit_event WHERE "targetId" = ?`, [signed.showcase.consentId]);
    const actions = rows.map((r) => r.action);
    for (const a of ['consent.sign', 'consent.pdf_view', 'consent.withdraw']) expect(actions).toContain(a);
  });
});
