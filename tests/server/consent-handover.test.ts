import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { HandoverSession } from '../../server/entities/handover-session.js';
import { MailLog } from '../../server/entities/mail-log.js';
import type { Patient } from '../../server/entities/patient.js';
import { CLAIM_LIMIT } from '../../server/features/consents/handover.routes.js';
import { nameMatches } from '../../server/features/consents/signature.js';
import { Client, createPatient, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';
import { answersFor, demoForms, handOver, signaturePng } from '../helpers/consents.js';
import sharp from 'sharp';

let t: TestApp;
let forms: Awaited<ReturnType<typeof demoForms>>;
let patient: Patient;
let other: Patient;
let adminClient: Client;

beforeAll(async () => {
  t = await makeTestApp();
  const admin = await signedIn(t, 'admin');
  adminClient = admin.client;
  forms = await demoForms(t, admin.user.id);
  patient = await createPatient(t.db, { firstName: 'Marit', lastName: 'Oyelaran-Voss', email: 'marit@mail.example' });
  other = await createPatient(t.db, { firstName: 'Other', lastName: 'Person' });
});
afterAll(() => t.close());

/** Counts of everything a failed signature must not leave behind. */
async function stored() {
  return {
    consents: await t.db.getRepository(ConsentRecord).count(),
    mails: await t.db.getRepository(MailLog).count(),
    objects: (await t.deps.storage.list('patients/')).length,
  };
}

const staffTablet = async (templateIds: string[], p = patient) => handOver((await signedIn(t, 'practitioner')).client, p.id, templateIds);

describe('hand-over on this tablet', () => {
  it('ends the staff sign-in and shows only the chosen forms of one patient', async () => {
    const tablet = await staffTablet([forms.treatment.id, forms.showcase.id]);
    expect((await tablet.get('/api/auth/me')).status).toBe(403);
    const res = await tablet.get('/api/handover');
    expect(res.status).toBe(200);
    expect(res.body.patient).toEqual({ firstName: 'Marit', lastName: 'Oyelaran-Voss' });
    expect(res.body.forms.map((f: { templateId: string; state: string }) => [f.templateId, f.state])).toEqual([
      [forms.treatment.id, 'to-do'],
      [forms.showcase.id, 'to-do'],
    ]);
    expect(res.body.forms[1]).toMatchObject({ optional: true, channels: ['clinic-website', 'social-media', 'print', 'professional-education'] });
    // Reaches nothing else: the patient list, another patient, the staff hand-over routes (the role matrix checks every route).
    expect((await tablet.get('/api/patients')).status).toBe(403);
    expect((await tablet.get(`/api/patients/${other.id}`)).status).toBe(403);
    expect((await tablet.get(`/api/patients/${patient.id}/consents`)).status).toBe(403);
    expect((await tablet.post('/api/handovers').send({ patientId: other.id, templateIds: [forms.treatment.id], mode: 'this-device' })).status).toBe(403);
    // A form that is not part of this hand-over is not there.
    expect((await tablet.post(`/api/handover/forms/${forms.screening.id}/shown`).send({})).status).toBe(404);
  });

  it('needs a staff sign-in to give the tablet back', async () => {
    const staff = await signedIn(t, 'practitioner');
    const tablet = await handOver(staff.client, patient.id, [forms.treatment.id]);
    const login = await tablet.login(staff.user.email);
    expect(login.status).toBe(200);
    expect((await tablet.get('/api/auth/me')).status).toBe(200);
    // The device is staff again, no longer in hand-over.
    expect((await tablet.get('/api/handover')).status).toBe(403);
  });

  it('lets the patient skip only the optional showcase consent', async () => {
    const tablet = await staffTablet([forms.photography.id, forms.showcase.id]);
    const required = await tablet.post(`/api/handover/forms/${forms.photography.id}/decline`).send({});
    expect(required.status).toBe(409);
    expect(required.body.error.code).toBe('FORM_REQUIRED');
    const declined = await tablet.post(`/api/handover/forms/${forms.showcase.id}/decline`).send({});
    expect(declined.status).toBe(200);
    expect(declined.body.completed).toBe(false);
    const sign = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: 'Marit Oyelaran-Voss', signature: await signaturePng() });
    expect(sign.body.completed).toBe(true);
    const state = (await tablet.get('/api/handover')).body;
    expect(state.completed).toBe(true);
    expect(state.forms.map((f: { state: string }) => f.state)).toEqual(['signed', 'declined']);
  });

  it('ends when it expires, and the device is locked out until staff sign in', async () => {
    const tablet = await staffTablet([forms.treatment.id]);
    const h = await t.db.getRepository(HandoverSession).findOneOrFail({ where: { patientId: patient.id }, order: { createdAt: 'DESC' } });
    await t.db.getRepository(HandoverSession).update({ id: h.id }, { expiresAt: new Date(Date.now() - 1000).toISOString() });
    const before = await stored();
    const res = await tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send({ answers: answersFor(forms.treatment), signerName: 'Marit Oyelaran-Voss', signature: await signaturePng() });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('HANDOVER_ENDED');
    expect(await stored()).toEqual(before);
    const after = await tablet.get('/api/handover');
    expect(after.status).toBe(401);
  });
});

describe('hand-over on a second device', () => {
  async function secondDevice(templateIds = [forms.treatment.id]) {
    const { client: staff } = await signedIn(t, 'coordinator');
    const res = await staff.post('/api/handovers').send({ patientId: patient.id, templateIds, mode: 'second-device' });
    expect(res.status).toBe(201);
    return { staff, ...(res.body as { id: string; code: string; token: string; path: string }) };
  }
  async function device() {
    const c = new Client(t.app);
    await c.refreshCsrf();
    return c;
  }

  it('is joined once with the short code; the staff member stays signed in', async () => {
    const { staff, id, code } = await secondDevice();
    expect(code).toMatch(/^[A-HJKMNP-Z2-9]{4}-[A-HJKMNP-Z2-9]{4}$/);
    const phone = await device();
    const claim = await phone.post('/api/handover/claim').send({ code: ` ${code.toLowerCase().replace('-', ' ')} ` });
    expect(claim.status).toBe(200);
    phone.csrf = claim.body.csrfToken;
    expect((await phone.get('/api/handover')).body.id).toBe(id);
    expect((await staff.get('/api/auth/me')).status).toBe(200);
    const status = await staff.get(`/api/handovers/${id}`);
    expect(status.body.state).toBe('in-progress');

    const second = await device();
    const reuse = await second.post('/api/handover/claim').send({ code });
    expect(reuse.status).toBe(409);
    expect(reuse.body.error.code).toBe('HANDOVER_USED');
    expect((await second.get('/api/handover')).status).toBe(401);
  });

  it('is joined once with the one-time link; the hash of the token is stored, never the token', async () => {
    const { id, token } = await secondDevice();
    const row = await t.db.getRepository(HandoverSession).findOneByOrFail({ id });
    expect(JSON.stringify(row)).not.toContain(token);
    const phone = await device();
    expect((await phone.post('/api/handover/claim').send({ token })).status).toBe(200);
    const again = await (await device()).post('/api/handover/claim').send({ token });
    expect(again.status).toBe(409);
  });

  it('refuses an expired, a cancelled and a wrong code with clear errors', async () => {
    const expired = await secondDevice();
    await t.db.getRepository(HandoverSession).update({ id: expired.id }, { expiresAt: new Date(Date.now() - 1).toISOString() });
    const e = await (await device()).post('/api/handover/claim').send({ code: expired.code });
    expect(e.status).toBe(410);
    expect(e.body.error.code).toBe('HANDOVER_EXPIRED');

    const cancelled = await secondDevice();
    expect((await cancelled.staff.post(`/api/handovers/${cancelled.id}/cancel`).send({})).status).toBe(204);
    expect((await (await device()).post('/api/handover/claim').send({ code: cancelled.code })).status).toBe(410);

    const wrong = await (await device()).post('/api/handover/claim').send({ code: 'AAAA-AAAA' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.code).toBe('HANDOVER_CODE_INVALID');
  });

  it('pauses claiming from an address after repeated wrong codes', async () => {
    const already = await t.db.getRepository(AuditEvent).countBy({ action: 'handover.claim_failed' });
    const d = await device();
    for (let i = already; i < CLAIM_LIMIT.failures; i++) await d.post('/api/handover/claim').send({ code: 'ZZZZ-ZZZZ' });
    const { code } = await secondDevice();
    const locked = await d.post('/api/handover/claim').send({ code });
    expect(locked.status).toBe(429);
  });
});

describe('bad input when signing: clear errors, nothing stored', () => {
  it('refuses an empty signature', async () => {
    const tablet = await staffTablet([forms.treatment.id]);
    const before = await stored();
    for (const signature of ['', 'data:,', await signaturePng({ empty: true })]) {
      const res = await tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send({ answers: answersFor(forms.treatment), signerName: 'Marit Oyelaran-Voss', signature });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('SIGNATURE_EMPTY');
    }
    // A dot is not a signature either.
    const dot = await sharp({ create: { width: 600, height: 200, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
      .composite([{ input: Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="600" height="200"><circle cx="300" cy="100" r="4" fill="#000"/></svg>') }])
      .png()
      .toBuffer();
    const tap = await tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send({ answers: answersFor(forms.treatment), signerName: 'Marit Oyelaran-Voss', signature: `data:image/png;base64,${dot.toString('base64')}` });
    expect(tap.body.error.code).toBe('SIGNATURE_EMPTY');
    expect(await stored()).toEqual(before);
  });

  it('refuses a signature that is not a PNG', async () => {
    const tablet = await staffTablet([forms.treatment.id]);
    const before = await stored();
    const jpeg = await sharp({ create: { width: 600, height: 200, channels: 3, background: '#fff' } }).jpeg().toBuffer();
    const astronaut = fs.readFileSync('/usr/lib/python3/dist-packages/skimage/data/astronaut.png');
    const cases = [
      `data:image/jpeg;base64,${jpeg.toString('base64')}`,
      `data:image/png;base64,${jpeg.toString('base64')}`,
      `data:image/png;base64,${Buffer.concat([astronaut.subarray(0, 200)]).toString('base64')}`,
      'not a data url',
    ];
    for (const signature of cases) {
      const res = await tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send({ answers: answersFor(forms.treatment), signerName: 'Marit Oyelaran-Voss', signature });
      expect(res.status, signature.slice(0, 30)).toBe(400);
      expect(res.body.error.code).toBe('SIGNATURE_NOT_PNG');
    }
    expect(await stored()).toEqual(before);
  });

  it('refuses missing answers, and a showcase consent without channels or crop', async () => {
    const tablet = await staffTablet([forms.screening.id, forms.showcase.id]);
    const before = await stored();
    const signature = await signaturePng();
    const missing = await tablet.post(`/api/handover/forms/${forms.screening.id}/sign`).send({ answers: { 'under-18': 'no' }, signerName: 'Marit Oyelaran-Voss', signature });
    expect(missing.status).toBe(400);
    expect(missing.body.error.code).toBe('ANSWERS_INVALID');
    expect(missing.body.error.message).toMatch(/Please answer/);
    const wrong = await tablet.post(`/api/handover/forms/${forms.screening.id}/sign`).send({ answers: answersFor(forms.screening, { 'under-18': 'maybe' }), signerName: 'Marit Oyelaran-Voss', signature });
    expect(wrong.body.error.code).toBe('ANSWERS_INVALID');
    const noChannels = await tablet.post(`/api/handover/forms/${forms.showcase.id}/sign`).send({ answers: answersFor(forms.showcase), crop: 'face', signerName: 'Marit Oyelaran-Voss', signature });
    expect(noChannels.body.error.code).toBe('CHANNELS_REQUIRED');
    const noCrop = await tablet.post(`/api/handover/forms/${forms.showcase.id}/sign`).send({ answers: answersFor(forms.showcase), channels: ['print'], signerName: 'Marit Oyelaran-Voss', signature });
    expect(noCrop.body.error.code).toBe('CROP_REQUIRED');
    expect(await stored()).toEqual(before);
  });

  it('saves a signature whose typed name differs from the record, with a warning (not a refusal: names are written many ways)', async () => {
    const tablet = await staffTablet([forms.treatment.id]);
    const res = await tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send({ answers: answersFor(forms.treatment), signerName: 'M. Smith', signature: await signaturePng() });
    expect(res.status).toBe(201);
    expect(res.body.warnings).toEqual([expect.objectContaining({ code: 'NAME_MISMATCH' })]);
    const record = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: res.body.consentId });
    expect(record.nameMatchesPatient).toBe(false);
    expect(nameMatches('zoe LUKASIEWICZ reznickova', { firstName: 'Zoë', lastName: 'Łukasiewicz-Řezníčková' })).toBe(true);
    expect(nameMatches('Zoë Novak', { firstName: 'Zoë', lastName: 'Łukasiewicz-Řezníčková' })).toBe(false);
  });

  it('refuses a form version the clinic retired, both when starting and when signing', async () => {
    const { body: v2 } = await adminClient.post(`/api/consent-templates/${forms.photography.id}/versions`).send({});
    const tablet = await staffTablet([forms.photography.id]);
    const before = await stored();
    expect((await adminClient.post(`/api/consent-templates/${v2.id}/publish`).send({})).status).toBe(200);
    const res = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: 'Marit Oyelaran-Voss', signature: await signaturePng() });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('TEMPLATE_RETIRED');
    expect(await stored()).toEqual(before);
    const { client: staff } = await signedIn(t, 'practitioner');
    const start = await staff.post('/api/handovers').send({ patientId: patient.id, templateIds: [forms.photography.id], mode: 'this-device' });
    expect(start.status).toBe(409);
    expect(start.body.error.code).toBe('TEMPLATE_RETIRED');
    expect((await staff.get('/api/auth/me')).status).toBe(200);
  });

  it('signs a form once only', async () => {
    const tablet = await staffTablet([forms.treatment.id]);
    const body = { answers: answersFor(forms.treatment), signerName: 'Marit Oyelaran-Voss', signature: await signaturePng() };
    const [a, b] = await Promise.all([tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send(body), tablet.post(`/api/handover/forms/${forms.treatment.id}/sign`).send(body)]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    expect([a.body, b.body].find((x) => x.error)?.error.code).toBe('FORM_ALREADY_DONE');
    const h = await t.db.getRepository(HandoverSession).findOneOrFail({ where: { patientId: patient.id }, order: { createdAt: 'DESC' } });
    expect(await t.db.getRepository(ConsentRecord).countBy({ handoverId: h.id })).toBe(1);
  });
});
