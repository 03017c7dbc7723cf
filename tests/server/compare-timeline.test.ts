import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { photoLikeJpeg, upload } from '../helpers/photos.js';
import { createProducts, createVisit } from '../helpers/treatments.js';

let t: TestApp;
let prac: Client;
let pracId: string;
let products: Awaited<ReturnType<typeof createProducts>>;

const DAY = 86_400_000;
const daysAgo = (d: number) => new Date(Date.now() - d * DAY).toISOString();

beforeAll(async () => {
  t = await makeTestApp();
  const p = await signedIn(t, 'practitioner');
  prac = p.client;
  pracId = p.user.id;
  products = await createProducts((await signedIn(t, 'admin')).client);
});
afterAll(() => t.close());

async function photo(visitId: string, view: string, seed: number) {
  const res = await upload(prac, visitId, await photoLikeJpeg(480, 600, seed), { view });
  if (res.status !== 201) throw new Error(`upload: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.id as string;
}

describe('patient timeline', () => {
  it('lists visits oldest first with their photos per view, gaps where a view was not taken, and no master files', async () => {
    const patient = await createPatient(t.db);
    // Booked out of order on purpose: the timeline sorts by the visit's time, not by booking.
    const review = await createVisit(prac, patient.id, pracId, daysAgo(10), 'review');
    const first = await createVisit(prac, patient.id, pracId, daysAgo(40), 'consultation');
    const cancelled = await createVisit(prac, patient.id, pracId, daysAgo(20), 'treatment');
    await prac.patch(`/api/visits/${cancelled.id}`).send({ status: 'cancelled' });
    await createVisit(prac, patient.id, pracId, new Date(Date.now() + 14 * DAY).toISOString(), 'review');

    const a = await photo(first.id, 'frontal-rest', 1);
    const b = await photo(first.id, 'lips-rest', 2);
    const c = await photo(review.id, 'frontal-rest', 3);

    const res = await prac.get(`/api/patients/${patient.id}/timeline`);
    expect(res.status).toBe(200);
    const tl = res.body as { views: { key: string }[]; visits: { id: string; kind: string; practitionerName: string; treatment: unknown; photos: Record<string, { id: string; variants: { variant: string; format: string }[] }> }[] };
    // Cancelled and future visits without photos are not part of the history.
    expect(tl.visits.map((v) => v.id)).toEqual([first.id, review.id]);
    expect(tl.visits.map((v) => v.kind)).toEqual(['consultation', 'review']);
    expect(tl.visits[0].practitionerName).toBe('Test practitioner');
    // The built-in shot list's eight views, in its order, so every gap shows.
    expect(tl.views.map((v) => v.key)).toEqual(['frontal-rest', 'frontal-smile', 'lips-rest', 'lips-pucker', 'oblique-left', 'oblique-right', 'lateral-left', 'lateral-right']);
    expect(Object.fromEntries(Object.entries(tl.visits[0].photos).map(([k, p]) => [k, p.id]))).toEqual({ 'frontal-rest': a, 'lips-rest': b });
    expect(Object.keys(tl.visits[1].photos)).toEqual(['frontal-rest']);
    expect(tl.visits[1].photos['frontal-rest'].id).toBe(c);
    for (const v of tl.visits) {
      for (const p of Object.values(v.photos)) {
        expect(p.variants.map((x) => x.variant)).not.toContain('master');
        expect(p.variants.some((x) => x.variant === 'display' && x.format === 'webp')).toBe(true);
      }
    }
    expect(tl.visits.every((v) => v.treatment === null)).toBe(true);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'timeline.view', patientId: patient.id })).toBe(1);
  });

  it('carries the treatment totals of a visit, and nothing of its notes', async () => {
    const patient = await createPatient(t.db);
    const visit = await createVisit(prac, patient.id, pracId, daysAgo(3), 'treatment');
    const saved = await prac.put(`/api/visits/${visit.id}/treatment`).send({
      notes: 'Private clinical note',
      lines: [
        { productId: products.soft.id, unit: 'mL', lotNumber: 'TS-1', expiryDate: '2099-12-31', doses: [{ zone: 'upper-body', amount: 0.3 }, { zone: 'lower-body', amount: 0.25 }] },
        { productId: products.toxin.id, unit: 'U', lotNumber: 'NM-1', expiryDate: '2099-12-31', doses: [{ zone: 'dao-right', amount: 3 }, { zone: 'dao-left', amount: 3 }] },
      ],
    });
    expect(saved.status).toBe(201);
    const res = await prac.get(`/api/patients/${patient.id}/timeline`);
    // 0.3 + 0.25 = 0.55 mL of filler, 3 + 3 = 6 U of toxin (hand-computed).
    expect(res.body.visits[0].treatment).toEqual({ fillerMl: 0.55, toxinU: 6, products: ['Test soft HA filler', 'Test neuromodulator'] });
    expect(JSON.stringify(res.body)).not.toContain('Private clinical note');
  });

  it('is closed to the front desk and answers 404 for an unknown patient', async () => {
    const patient = await createPatient(t.db);
    const desk = (await signedIn(t, 'coordinator')).client;
    expect((await desk.get(`/api/patients/${patient.id}/timeline`)).status).toBe(403);
    const missing = await prac.get('/api/patients/00000000-0000-4000-8000-000000000000/timeline');
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBe('NOT_FOUND');
  });
});
