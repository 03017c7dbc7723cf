import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { User } from '../../server/entities/user.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { photoLikeJpeg, upload } from '../helpers/photos.js';
import { createProducts, createVisit, insertScreening } from '../helpers/treatments.js';

let t: TestApp;
let prac: Client;
let coord: Client;
let practitioner: User;
let products: Awaited<ReturnType<typeof createProducts>>;

/** The clinic day under test, in Europe/London (GMT in November). */
const DAY = '2025-11-05';

beforeAll(async () => {
  t = await makeTestApp();
  const admin = (await signedIn(t, 'admin')).client;
  ({ client: prac, user: practitioner } = await signedIn(t, 'practitioner'));
  coord = (await signedIn(t, 'coordinator')).client;
  products = await createProducts(admin);
});
afterAll(() => t.close());

const line = (extra: Record<string, unknown> = {}) => ({ productId: products.soft.id, unit: 'mL', lotNumber: 'OI-1', expiryDate: '2099-01-01', doses: [{ zone: 'lower-body', amount: 0.4 }], ...extra });

async function dayItems(client: Client) {
  const res = await client.get(`/api/clinic-day/open-items?date=${DAY}`);
  expect(res.status).toBe(200);
  return res.body as { visits: { visitId: string; ready: boolean; items: { type: string; count?: number; message: string; dueOn?: string }[] }[]; overdueReviews: { patient: { id: string }; dueOn: string; treatedOn: string }[] };
}

describe('open items of a clinic day', () => {
  it('lists what each visit lacks, and chases overdue reviews', async () => {
    // A treatment in progress: one line without a lot, no photos yet, no forms signed.
    const a = await createPatient(t.db);
    const va = await createVisit(prac, a.id, practitioner.id, `${DAY}T10:00:00Z`);
    await prac.patch(`/api/visits/${va.id}`).send({ status: 'in-progress' });
    await prac.put(`/api/visits/${va.id}/treatment`).send({ treatedAt: `${DAY}T10:20:00Z`, lines: [line(), line({ productId: products.firm.id, lotNumber: null, expiryDate: null })] });
    // Two views taken of the eight in the default shot list.
    for (const [i, view] of ['frontal-rest', 'lips-rest'].entries()) {
      const res = await upload(prac, va.id, await photoLikeJpeg(640, 480, i), { view });
      expect(res.status).toBe(201);
    }

    // A treatment visit marked completed with no treatment recorded.
    const b = await createPatient(t.db);
    const vb = await createVisit(prac, b.id, practitioner.id, `${DAY}T11:00:00Z`);
    await prac.patch(`/api/visits/${vb.id}`).send({ status: 'completed' });

    // Treated on 1 October, review due 15 October, back today for something else: the review is overdue.
    const c = await createPatient(t.db);
    const vcOld = await createVisit(prac, c.id, practitioner.id, '2025-10-01T10:00:00Z');
    await prac.put(`/api/visits/${vcOld.id}/treatment`).send({ treatedAt: '2025-10-01T10:10:00Z', lines: [line()] });
    const vc = await createVisit(prac, c.id, practitioner.id, `${DAY}T12:00:00Z`, 'follow-up');

    // Not coming today: one overdue and never seen again, one with a review booked next week, one still within the grace week.
    const d = await createPatient(t.db, { firstName: 'Della', phone: '+44 7700 900555' });
    const vd = await createVisit(prac, d.id, practitioner.id, '2025-10-01T10:00:00Z');
    await prac.put(`/api/visits/${vd.id}/treatment`).send({ treatedAt: '2025-10-01T10:10:00Z', lines: [line()] });
    const e = await createPatient(t.db);
    const ve = await createVisit(prac, e.id, practitioner.id, '2025-10-01T10:00:00Z');
    await prac.put(`/api/visits/${ve.id}/treatment`).send({ treatedAt: '2025-10-01T10:10:00Z', lines: [line()] });
    await createVisit(prac, e.id, practitioner.id, '2025-11-12T10:00:00Z', 'review');
    const f = await createPatient(t.db);
    const vf = await createVisit(prac, f.id, practitioner.id, '2025-10-16T10:00:00Z');
    await prac.put(`/api/visits/${vf.id}/treatment`).send({ treatedAt: '2025-10-16T10:10:00Z', lines: [line()] });

    const { visits, overdueReviews } = await dayItems(prac);
    const of = (id: string) => visits.find((v) => v.visitId === id)!;

    const itemsA = of(va.id).items;
    expect(itemsA.find((i) => i.type === 'lot-missing')).toMatchObject({ count: 1, message: '1 product line has no lot number.' });
    expect(itemsA.find((i) => i.type === 'views-missing')).toMatchObject({ count: 6, message: '6 of 8 views not taken yet.' });
    // The consent records' own items come along: no treatment consent, no screening, no photography consent.
    expect(itemsA.filter((i) => i.type === 'consent-missing').length).toBe(3);
    expect(of(va.id).ready).toBe(false);

    expect(of(vb.id).items.map((i) => i.type)).toContain('treatment-missing');
    // A booked visit has not started: no "views missing" yet.
    expect(of(vc.id).items.map((i) => i.type)).not.toContain('views-missing');
    expect(of(vc.id).items.find((i) => i.type === 'review-overdue')).toMatchObject({ dueOn: '2025-10-15' });

    // Review due 15 October + 7 days grace < 5 November: Della is chased; Ede has a review booked; Fay is due 30 October (in grace).
    expect(overdueReviews.map((r) => r.patient.id)).toContain(d.id);
    expect(overdueReviews.find((r) => r.patient.id === d.id)).toMatchObject({ dueOn: '2025-10-15', treatedOn: '2025-10-01' });
    expect(overdueReviews.map((r) => r.patient.id)).not.toContain(e.id);
    expect(overdueReviews.map((r) => r.patient.id)).not.toContain(f.id);
    // Patient C is seen today, so the review shows on today's visit, not in the list to call.
    expect(overdueReviews.map((r) => r.patient.id)).not.toContain(c.id);
  });

  it('shows the front desk the same items without clinical detail', async () => {
    const g = await createPatient(t.db);
    const vg = await createVisit(prac, g.id, practitioner.id, `${DAY}T15:00:00Z`);
    await insertScreening(t.db, g.id, ['pregnant-breastfeeding']);
    await prac.put(`/api/visits/${vg.id}/treatment`).send({ treatedAt: `${DAY}T15:00:00Z`, lines: [line({ lotNumber: null })] }).expect(409);

    const asCoord = await dayItems(coord);
    const asPrac = await dayItems(prac);
    const mine = asCoord.visits.find((v) => v.visitId === vg.id)!;
    expect(mine.items.map((i) => i.type)).toEqual(asPrac.visits.find((v) => v.visitId === vg.id)!.items.map((i) => i.type));
    expect(mine.items.map((i) => i.type)).toContain('screening-flags');
    const text = JSON.stringify(asCoord);
    expect(text).not.toMatch(/pregnant|Test soft HA filler|OI-1|lower-body|flaggedQuestionIds/);
    expect((await coord.get('/api/clinic-day/open-items?date=5-11-2025')).status).toBe(400);
  });
});
