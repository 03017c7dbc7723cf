import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { REVIEW_EXIT_ATTEMPTS } from '../../server/features/compare/review-lock.js';
import { createPatient, makeTestApp, signedIn, TEST_PASSWORD, type Client, type TestApp } from '../helpers/app.js';
import { patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

let t: TestApp;
let practitionerId: string;
let staff: Client;
let mine: { patientId: string; photoId: string };
let other: { patientId: string; photoId: string };

async function patientWithPhoto(client: Client, seed: number) {
  const { patient, visit } = await patientWithVisit(t, client, practitionerId);
  const res = await upload(client, visit.id, await photoLikeJpeg(640, 800, seed), { view: 'frontal-rest' });
  if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { patientId: patient.id, photoId: res.body.id as string };
}

beforeAll(async () => {
  t = await makeTestApp();
  const p = await signedIn(t, 'practitioner');
  staff = p.client;
  practitionerId = p.user.id;
  mine = await patientWithPhoto(staff, 1);
  other = await patientWithPhoto(staff, 2);
});
afterAll(() => t.close());

/** A fresh signed-in practitioner in review mode for `mine`. */
async function inReview(): Promise<Client> {
  const { client } = await signedIn(t, 'practitioner');
  const res = await client.post(`/api/patients/${mine.patientId}/review`).send({ view: 'frontal-rest', baselinePhotoId: mine.photoId, mode: 'slider' });
  expect(res.status).toBe(201);
  expect(res.body).toMatchObject({ active: true, patientId: mine.patientId, setup: { view: 'frontal-rest', mode: 'slider', aligned: true } });
  return client;
}

describe('review mode', () => {
  it('is kept in the session, so a reload comes back to the same patient and comparison', async () => {
    const c = await inReview();
    const state = await c.get('/api/review');
    expect(state.status).toBe(200);
    expect(state.body).toMatchObject({ active: true, patientId: mine.patientId, setup: { baselinePhotoId: mine.photoId } });
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'review.start', patientId: mine.patientId })).toBeGreaterThan(0);
  });

  it('answers only the reviewed patient: other patients, lists and writes are refused with REVIEW_MODE', async () => {
    const c = await inReview();
    // Allowed: the reviewed patient, their photos and the staff member's own session.
    expect((await c.get(`/api/patients/${mine.patientId}`)).status).toBe(200);
    expect((await c.get(`/api/patients/${mine.patientId}/timeline`)).status).toBe(200);
    expect((await c.get(`/api/photos/${mine.photoId}/file?variant=thumb`)).status).toBe(200);
    expect((await c.get('/api/auth/me')).status).toBe(200);
    // Refused: everything that could show someone else, or change anything.
    const refused = [
      await c.get(`/api/patients/${other.patientId}`),
      await c.get(`/api/patients/${other.patientId}/timeline`),
      await c.get(`/api/photos/${mine.photoId}/file?variant=master`),
      await c.get(`/api/photos/${other.photoId}/file?variant=display`),
      await c.get(`/api/photos/${other.photoId}`),
      await c.get('/api/patients'),
      await c.get('/api/clinic-day'),
      // The visit list carries staff notes, so it stays closed even for the reviewed patient.
      await c.get(`/api/patients/${mine.patientId}/visits`),
      await c.patch(`/api/patients/${mine.patientId}`).send({ firstName: 'Changed' }),
      await c.post(`/api/patients/${other.patientId}/review`).send({ view: 'frontal-rest' }),
      // Default deny: a path that differs only in case or a trailing slash is not let through.
      await c.get(`/api/patients/${other.patientId}/`),
      await c.get(`/API/patients/${other.patientId}`),
    ];
    refused.forEach((res, i) => {
      expect(res.status, `call ${i}`).toBe(403);
      expect(res.body.error.code, `call ${i}`).toBe('REVIEW_MODE');
    });
  });

  it('leaves only with the staff member\'s own password; a wrong one is refused and logged', async () => {
    const c = await inReview();
    const wrong = await c.post('/api/review/exit').send({ password: 'not-it' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error).toMatchObject({ code: 'WRONG_PASSWORD', details: { field: 'password', attemptsLeft: REVIEW_EXIT_ATTEMPTS - 1 } });
    expect((await c.get(`/api/patients/${other.patientId}`)).status).toBe(403);

    const missing = await c.post('/api/review/exit').send({});
    expect(missing.status).toBe(400);
    expect(missing.body.error.code).toBe('VALIDATION_FAILED');

    const ok = await c.post('/api/review/exit').send({ password: TEST_PASSWORD });
    expect(ok.status).toBe(200);
    expect((await c.get('/api/review')).body).toEqual({ active: false });
    expect((await c.get(`/api/patients/${other.patientId}`)).status).toBe(200);
    const log = t.db.getRepository(AuditEvent);
    expect(await log.countBy({ action: 'review.exit_refused', patientId: mine.patientId })).toBeGreaterThan(0);
    expect(await log.countBy({ action: 'review.end', patientId: mine.patientId })).toBeGreaterThan(0);
  });

  it(`signs the staff member out after ${REVIEW_EXIT_ATTEMPTS} wrong passwords, leaving nothing of the patient reachable`, async () => {
    const c = await inReview();
    for (let i = 1; i < REVIEW_EXIT_ATTEMPTS; i++) expect((await c.post('/api/review/exit').send({ password: `guess-${i}` })).status).toBe(400);
    const last = await c.post('/api/review/exit').send({ password: 'guess-last' });
    expect(last.status).toBe(401);
    expect(last.body.error.code).toBe('SESSION_ENDED');
    expect([401]).toContain((await c.get(`/api/patients/${mine.patientId}`)).status);
  });

  it('refuses a photo of another patient or of another view, and storing nothing', async () => {
    const { client } = await signedIn(t, 'practitioner');
    const foreign = await client.post(`/api/patients/${mine.patientId}/review`).send({ view: 'frontal-rest', baselinePhotoId: other.photoId });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.code).toBe('PHOTO_OF_ANOTHER_PATIENT');
    const view = await client.post(`/api/patients/${mine.patientId}/review`).send({ view: 'lips-rest', baselinePhotoId: mine.photoId });
    expect(view.status).toBe(400);
    expect(view.body.error.code).toBe('VIEW_MISMATCH');
    const unknown = await client.post(`/api/patients/${(await createPatient(t.db)).id}00/review`).send({ view: 'frontal-rest' });
    expect(unknown.status).toBe(400);
    expect((await client.get('/api/review')).body).toEqual({ active: false });
  });

  it('is not open to the front desk', async () => {
    const { client } = await signedIn(t, 'coordinator');
    const res = await client.post(`/api/patients/${mine.patientId}/review`).send({ view: 'frontal-rest' });
    expect(res.status).toBe(403);
  });
});
