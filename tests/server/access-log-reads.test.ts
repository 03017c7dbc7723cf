import argon2 from 'argon2';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Router } from 'express';
import { MoreThanOrEqual } from 'typeorm';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { alignmentWorkerFor } from '../../server/features/landmarks/alignment-worker.js';
import { renderPortrait } from '../../server/media/synthetic-portrait.js';
import { nowIso } from '../../server/lib/time.js';
import { Client, createPatient, createUser, makeTestApp, signedIn, TEST_PASSWORD, type TestApp } from '../helpers/app.js';
import { answersFor, binary, demoForms, handOver, signaturePng } from '../helpers/consents.js';
import { upload } from '../helpers/photos.js';
import { createProducts } from '../helpers/treatments.js';

/**
 * Every GET route of the API, classified by what it returns (HIPAA 45 CFR 164.312(b), audit controls: record who
 * read which patient's data):
 * - `patient`: one patient's data; a read must leave an access-log entry by the reader naming that patient;
 * - `list`: a clinic-wide list naming several patients (search, clinic day, queues); a read must leave an entry by
 *   the reader;
 * - a reason string: no patient data.
 * A GET route missing here fails the test, so a new route must be classified (and logged) when it is added.
 */
type Read = { kind: 'patient'; url: (f: Fixture) => string } | { kind: 'list'; url: string } | { kind: 'none'; why: string };
const patient = (url: (f: Fixture) => string): Read => ({ kind: 'patient', url });
const list = (url: string): Read => ({ kind: 'list', url });
const none = (why: string): Read => ({ kind: 'none', why });

const READS: Record<string, Read> = {
  'GET /api/health': none('liveness'),
  'GET /api/health/ready': none('readiness of the database, object store and mail queue'),
  'GET /api/auth/csrf': none('a CSRF token'),
  'GET /api/auth/me': none('the signed-in staff user'),
  'GET /api/users': none('staff accounts'),
  'GET /api/practitioners': none('staff names'),
  'GET /api/settings': none('clinic settings'),
  'GET /api/treatment-settings': none('clinic settings'),
  'GET /api/consent-templates': none('blank form texts'),
  'GET /api/consent-templates/:id': none('a blank form text'),
  'GET /api/shot-lists': none('clinic set-up'),
  'GET /api/shot-lists/:id': none('clinic set-up'),
  'GET /api/products': none('product catalogue'),
  'GET /api/stock': none('lots on the shelf'),
  'GET /api/stock/lots/:id': none("a lot's ledger: pack counts and treatment ids, no patient data"),
  'GET /api/stock/alerts': none('lots on the shelf'),
  'GET /api/stock/emergency-kit': none('lots on the shelf'),
  'GET /api/stock/usage': none('amounts per product and practitioner, no patient'),
  'GET /api/patients/:id/complications': patient((f) => `/api/patients/${f.patientId}/complications`),
  'GET /api/complications/:id': patient((f) => `/api/complications/${f.complicationId}`),
  'GET /api/complications/:id/pdf': patient((f) => `/api/complications/${f.complicationId}/pdf`),
  'GET /api/integrity': none('chain heads and digests: hashes and counts, no patient data'),
  'GET /api/verify/certificate': none("the clinic's public signing certificate"),
  'GET /api/review': none('whether this session is in review mode (an id, no record); starting review mode is logged'),
  'GET /api/handover': none("the patient's own forms, on the hand-over device the patient holds; the claim is logged"),
  'GET /api/patients': list('/api/patients?q=Auditley'),
  'GET /api/clinic-day': list('/api/clinic-day'),
  'GET /api/clinic-day/open-items': list('/api/clinic-day/open-items'),
  'GET /api/reminders': list('/api/reminders'),
  'GET /api/showcase-requests': list('/api/showcase-requests'),
  'GET /api/outbox': list('/api/outbox'),
  'GET /api/access-log': list('/api/access-log'),
  'GET /api/access-log.csv': list('/api/access-log.csv'),
  'GET /api/patients/:id': patient((f) => `/api/patients/${f.patientId}`),
  'GET /api/patients/:id/visits': patient((f) => `/api/patients/${f.patientId}/visits`),
  'GET /api/visits/:id': patient((f) => `/api/visits/${f.visitIds[0]}`),
  'GET /api/visits/:id/open-items': patient((f) => `/api/visits/${f.visitIds[0]}/open-items`),
  'GET /api/patients/:id/export': patient((f) => `/api/patients/${f.patientId}/export`),
  'GET /api/patients/:id/consents': patient((f) => `/api/patients/${f.patientId}/consents`),
  'GET /api/consents/:id': patient((f) => `/api/consents/${f.consentId}`),
  'GET /api/consents/:id/pdf': patient((f) => `/api/consents/${f.consentId}/pdf`),
  'GET /api/consents/:id/verify': patient((f) => `/api/consents/${f.consentId}/verify`),
  'GET /api/handovers/:id': patient((f) => `/api/handovers/${f.handoverId}`),
  'GET /api/outbox/:id': patient((f) => `/api/outbox/${f.mailId}`),
  'GET /api/visits/:visitId/photos': patient((f) => `/api/visits/${f.visitIds[0]}/photos`),
  'GET /api/patients/:id/photos': patient((f) => `/api/patients/${f.patientId}/photos`),
  'GET /api/photos/:id': patient((f) => `/api/photos/${f.photoIds[0]}`),
  'GET /api/photos/:id/file': patient((f) => `/api/photos/${f.photoIds[0]}/file?variant=thumb`),
  'GET /api/photos/:id/landmarks': patient((f) => `/api/photos/${f.photoIds[0]}/landmarks`),
  'GET /api/patients/:id/pairs': patient((f) => `/api/patients/${f.patientId}/pairs?view=frontal-rest`),
  'GET /api/patients/:id/measurements': patient((f) => `/api/patients/${f.patientId}/measurements`),
  'GET /api/patients/:id/timeline': patient((f) => `/api/patients/${f.patientId}/timeline`),
  'GET /api/patients/:id/compare': patient((f) => `/api/patients/${f.patientId}/compare?baseline=${f.photoIds[0]}&followUp=${f.photoIds[1]}`),
  'GET /api/visits/:id/treatment': patient((f) => `/api/visits/${f.visitIds[0]}/treatment`),
  'GET /api/patients/:id/treatments': patient((f) => `/api/patients/${f.patientId}/treatments`),
  'GET /api/visits/:id/screening': patient((f) => `/api/visits/${f.visitIds[0]}/screening`),
  'GET /api/visits/:id/consultation': patient((f) => `/api/visits/${f.visitIds[0]}/consultation`),
  'GET /api/patients/:id/reminders': patient((f) => `/api/patients/${f.patientId}/reminders`),
  'GET /api/patients/:id/reference-pictures': patient((f) => `/api/patients/${f.patientId}/reference-pictures`),
  'GET /api/reference-pictures/:id/file': patient((f) => `/api/reference-pictures/${f.referencePictureId}/file?variant=thumb`),
  'GET /api/patients/:id/showcase': patient((f) => `/api/patients/${f.patientId}/showcase`),
  'GET /api/showcase-exports/:id/files/:name': patient((f) => f.exportFileUrl),
};

interface Fixture {
  patientId: string;
  visitIds: string[];
  photoIds: string[];
  consentId: string;
  handoverId: string;
  mailId: string;
  referencePictureId: string;
  exportFileUrl: string;
  complicationId: string;
}

function getRoutes(router: Router): string[] {
  return (router.stack as { route?: { path: string; methods: Record<string, boolean> } }[])
    .filter((l) => l.route?.methods.get)
    .map((l) => `GET ${l.route!.path}`);
}

let t: TestApp;
let f: Fixture;
let passwordHash: string;

/** A reader who has never read anything, so an entry after the call can only come from that call. */
async function freshAdmin(): Promise<{ client: Client; id: string }> {
  const user = await createUser(t.db, 'admin', { passwordHash });
  const client = new Client(t.app);
  expect((await client.login(user.email, TEST_PASSWORD)).status).toBe(200);
  return { client, id: user.id };
}

beforeAll(async () => {
  t = await makeTestApp();
  const { client: admin, user: adminUser } = await signedIn(t, 'admin');
  // Readers sign in with a cheap argon2id hash (same algorithm, tiny cost) so one reader per route stays quick.
  passwordHash = await argon2.hash(TEST_PASSWORD, { type: argon2.argon2id, memoryCost: 1024, timeCost: 1 });
  const { client: prac, user: pracUser } = await signedIn(t, 'practitioner');
  const p = await createPatient(t.db, { firstName: 'Aurelie', lastName: 'Auditley' });
  // Two visits with a frontal portrait each (a comparable pair), a treatment and a consultation.
  const visitIds: string[] = [];
  const photoIds: string[] = [];
  for (const [i, lipVolume] of [0.2, 0.6].entries()) {
    const startsAt = new Date(Date.now() - (30 - i * 21) * 86_400_000).toISOString();
    const visit = await prac.post(`/api/patients/${p.id}/visits`).send({ startsAt, kind: i ? 'review' : 'treatment', practitionerId: pracUser.id });
    visitIds.push(visit.body.id);
    const up = await upload(prac, visit.body.id, await renderPortrait({ seed: 31, view: 'frontal-rest', lipVolume, shot: i }, { capturedAt: startsAt }), { view: 'frontal-rest' });
    expect(up.status).toBe(201);
    photoIds.push(up.body.id);
  }
  await alignmentWorkerFor(t.deps).idle();
  const products = await createProducts(admin);
  const line = { productId: products.soft.id, unit: 'mL', lotNumber: 'AU-1001', expiryDate: '2099-12-31', doses: [{ zone: 'upper-body', amount: 0.3 }], techniques: ['linear-threading'], device: 'needle', gauge: 30, depth: 'submucosal' };
  expect((await prac.put(`/api/visits/${visitIds[0]}/treatment`).send({ lines: [line] })).status).toBeLessThan(300);
  const episode = await prac.post(`/api/visits/${visitIds[0]}/complications`).send({ signs: ['swelling'] });
  expect(episode.status).toBe(201);
  expect((await prac.put(`/api/visits/${visitIds[0]}/consultation`).send({ goals: ['more-volume'], targetRatio: '1:1.6', plan: [] })).status).toBeLessThan(300);
  // Signed photography and showcase consents (the e-mailed copies give an outbox row naming the patient).
  const forms = await demoForms(t, adminUser.id);
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, p.id, [forms.photography.id, forms.showcase.id]);
  const signer = { signerName: 'Aurelie Auditley', signature: await signaturePng() };
  const signed = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), ...signer });
  expect(signed.status).toBe(201);
  const show = await tablet.post(`/api/handover/forms/${forms.showcase.id}/sign`).send({ answers: answersFor(forms.showcase), channels: ['social-media'], crop: 'face', ...signer });
  expect(show.status).toBe(201);
  const handoverId = (await t.db.query(`SELECT "id" FROM "handover_session" WHERE "patientId" = ?`, [p.id]))[0].id as string;
  const mail = await t.db.getRepository(MailLog).findOneByOrFail({ patientId: p.id });
  // A cleared showcase request with an export.
  const nominated = await prac.post(`/api/patients/${p.id}/showcase-requests`).send({ viewKey: 'frontal-rest', photoIds, channels: ['social-media'] });
  expect(nominated.status).toBe(201);
  expect((await admin.post(`/api/showcase-requests/${nominated.body.id}/clear`).send({})).status).toBe(200);
  const exp = await admin.post(`/api/showcase-requests/${nominated.body.id}/exports`).send({ channel: 'social-media' });
  expect(exp.status).toBe(201);
  const picture = await prac
    .post(`/api/patients/${p.id}/reference-pictures`)
    .attach('picture', await renderPortrait({ seed: 32, view: 'lips-rest', lipVolume: 0.8, shot: 0 }), { filename: 'wish.jpg', contentType: 'image/jpeg' });
  expect(picture.status).toBe(201);
  f = { patientId: p.id, visitIds, photoIds, consentId: signed.body.consentId, handoverId, mailId: mail.id, referencePictureId: picture.body.id, exportFileUrl: exp.body.files[0].url, complicationId: episode.body.id };
}, 240_000);
afterAll(() => t.close());

describe('every read of patient data is in the access log', () => {
  it('classifies every GET route of the API, and nothing that is not registered', () => {
    const routes = getRoutes(t.app.apiRouter);
    expect(routes.filter((r) => !(r in READS))).toEqual([]);
    expect(Object.keys(READS).filter((r) => !routes.includes(r))).toEqual([]);
  });

  it('leaves an entry naming the patient for each route that returns one patient’s data', { timeout: 240_000 }, async () => {
    const missing: string[] = [];
    for (const [route, read] of Object.entries(READS)) {
      if (read.kind !== 'patient') continue;
      const reader = await freshAdmin();
      const since = nowIso();
      const res = await binary(reader.client.get(read.url(f)));
      if (res.status !== 200) {
        missing.push(`${route}: answered ${res.status} ${res.headers['content-type']?.includes('json') ? (res.body as Buffer).toString().slice(0, 200) : ''}`);
        continue;
      }
      const logged = await t.db.getRepository(AuditEvent).countBy({ actorId: reader.id, patientId: f.patientId, at: MoreThanOrEqual(since) });
      if (logged < 1) missing.push(`${route}: no access-log entry`);
    }
    expect(missing).toEqual([]);
  });

  it('leaves an entry by the reader for each clinic-wide list of patients', { timeout: 120_000 }, async () => {
    const missing: string[] = [];
    for (const [route, read] of Object.entries(READS)) {
      if (read.kind !== 'list') continue;
      const reader = await freshAdmin();
      const res = await reader.client.get(read.url);
      if (res.status !== 200) missing.push(`${route}: answered ${res.status}`);
      else if ((await t.db.getRepository(AuditEvent).countBy({ actorId: reader.id })) < 2) missing.push(`${route}: no access-log entry`); // the first is the sign-in
    }
    expect(missing).toEqual([]);
  });

  it('logs opening a patient screen once, not once per list or thumbnail; a full-size photo keeps its own entry', { timeout: 60_000 }, async () => {
    const reader = await freshAdmin();
    const since = nowIso();
    const screen = [
      `/api/patients/${f.patientId}`,
      `/api/patients/${f.patientId}/visits`,
      `/api/patients/${f.patientId}/consents`,
      `/api/patients/${f.patientId}/reminders`,
      `/api/patients/${f.patientId}/photos`,
      `/api/photos/${f.photoIds[0]}/file?variant=thumb`,
      `/api/photos/${f.photoIds[1]}/file?variant=thumb`,
    ];
    for (const url of screen) expect((await binary(reader.client.get(url))).status, url).toBe(200);
    const rows = () => t.db.getRepository(AuditEvent).findBy({ actorId: reader.id, patientId: f.patientId, at: MoreThanOrEqual(since) });
    expect((await rows()).map((r) => r.action)).toEqual(['patient.view']);
    expect((await binary(reader.client.get(`/api/photos/${f.photoIds[0]}/file?variant=display`))).status).toBe(200);
    expect((await rows()).map((r) => r.action).sort()).toEqual(['patient.view', 'photo.view']);
  });
});
