import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import type { Patient } from '../../server/entities/patient.js';
import type { User } from '../../server/entities/user.js';
import { Visit } from '../../server/entities/visit.js';
import { newId, nowIso } from '../../server/lib/time.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, demoForms, handOver, signaturePng } from '../helpers/consents.js';

let t: TestApp;
let forms: Awaited<ReturnType<typeof demoForms>>;
let patient: Patient;
let practitioner: { client: Client; user: User };
let visitId: string;

beforeAll(async () => {
  t = await makeTestApp();
  const admin = await signedIn(t, 'admin');
  forms = await demoForms(t, admin.user.id);
  patient = await createPatient(t.db, { firstName: 'Ottilie', lastName: 'Brannagh' });
  practitioner = await signedIn(t, 'practitioner');
  visitId = newId();
  await t.db.getRepository(Visit).insert({
    id: visitId,
    patientId: patient.id,
    practitionerId: practitioner.user.id,
    startsAt: new Date(Date.now() + 3600_000).toISOString(),
    kind: 'treatment',
    status: 'booked',
    notes: '',
    createdAt: nowIso(),
    updatedAt: nowIso(),
  });
});
afterAll(() => t.close());

const items = async (c: Client = practitioner.client) => (await c.get(`/api/visits/${visitId}/open-items`)).body;

describe('open items of a visit', () => {
  it('lists the consents a treatment visit still needs', async () => {
    const res = await items();
    expect(res.ready).toBe(false);
    expect(res.items.map((i: { type: string; kind: string }) => `${i.type}:${i.kind}`)).toEqual([
      'consent-missing:treatment',
      'consent-missing:screening',
      'consent-missing:photography',
    ]);
  });

  it('asks for the practitioner to review flagged screening answers, then is ready', async () => {
    const tablet = await handOver((await signedIn(t, 'coordinator')).client, patient.id, [forms.treatment.id, forms.screening.id, forms.photography.id]);
    const signature = await signaturePng();
    for (const f of [forms.treatment, forms.screening, forms.photography]) {
      const answers = answersFor(f, f.kind === 'screening' ? { 'pregnant-breastfeeding': 'yes' } : {});
      const res = await tablet.post(`/api/handover/forms/${f.id}/sign`).send({ answers, signerName: 'Ottilie Brannagh', signature });
      expect(res.status).toBe(201);
    }
    const open = await items();
    expect(open.items).toEqual([expect.objectContaining({ type: 'screening-flags', kind: 'screening', flaggedQuestionIds: ['pregnant-breastfeeding'] })]);
    const consentId = open.items[0].consentId;

    // The front desk sees that a review is needed, not which answer.
    const { client: desk } = await signedIn(t, 'coordinator');
    const deskView = await items(desk);
    expect(deskView.items[0].type).toBe('screening-flags');
    expect(deskView.items[0].flaggedQuestionIds).toBeUndefined();
    expect((await desk.post(`/api/consents/${consentId}/acknowledge-flags`).send({ note: 'ok' })).status).toBe(403);

    const empty = await practitioner.client.post(`/api/consents/${consentId}/acknowledge-flags`).send({ note: ' ' });
    expect(empty.status).toBe(400);
    const ack = await practitioner.client.post(`/api/consents/${consentId}/acknowledge-flags`).send({ note: 'Not pregnant now; breastfeeding stopped 8 months ago. Discussed; proceed.' });
    expect(ack.status).toBe(200);
    expect(ack.body).toMatchObject({ acknowledgedById: practitioner.user.id, flaggedQuestionIds: ['pregnant-breastfeeding'] });
    expect((await practitioner.client.post(`/api/consents/${consentId}/acknowledge-flags`).send({ note: 'again' })).status).toBe(409);
    expect(await t.db.getRepository(AuditEvent).existsBy({ action: 'consent.flags_acknowledge', targetId: consentId })).toBe(true);
    expect(await items()).toEqual({ visitId, ready: true, items: [] });

    const noFlags = (await practitioner.client.get(`/api/patients/${patient.id}/consents`)).body.find((c: { kind: string }) => c.kind === 'treatment');
    expect((await practitioner.client.post(`/api/consents/${noFlags.id}/acknowledge-flags`).send({ note: 'x' })).body.error.code).toBe('NO_FLAGS');
  });

  it('shows a withdrawn photography consent as an open item', async () => {
    const list = (await practitioner.client.get(`/api/patients/${patient.id}/consents`)).body;
    const photo = list.find((c: { kind: string }) => c.kind === 'photography');
    await practitioner.client.post(`/api/consents/${photo.id}/withdraw`).send({ reason: 'Changed her mind.' });
    const open = await items();
    expect(open.items).toEqual([expect.objectContaining({ type: 'consent-withdrawn', kind: 'photography', consentId: photo.id })]);
  });

  it('treats a screening signed more than 30 days before the visit as outdated (common practice)', async () => {
    await t.db.getRepository(Visit).update({ id: visitId }, { startsAt: new Date(Date.now() + 40 * 86_400_000).toISOString() });
    const open = await items();
    expect(open.items.map((i: { type: string; kind: string }) => `${i.type}:${i.kind}`)).toContain('consent-outdated:screening');
  });

  it('answers 404 for an unknown visit', async () => {
    expect((await practitioner.client.get(`/api/visits/${newId()}/open-items`)).status).toBe(404);
  });
});
