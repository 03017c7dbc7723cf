import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Product } from '../../server/entities/product.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { createVisit } from '../helpers/treatments.js';

let t: TestApp;
let admin: Client;
let prac: Client;
let practitionerId: string;

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  const p = await signedIn(t, 'practitioner');
  prac = p.client;
  practitionerId = p.user.id;
});
afterAll(() => t.close());

describe('product catalogue: GTIN, unit labels, hyaluronidase', () => {
  it('stores a GTIN in its 14-digit form and refuses a wrong GS1 check digit', async () => {
    // GS1 General Specifications, section 7.9.1; GTIN-13 4006381333931 (FACTS 24: 400638133393 → check digit 1).
    const ok = await admin.post('/api/products').send({ name: 'Scan-me filler', kind: 'filler', unit: 'mL', manufacturer: 'Testmoor Labs', packSize: 1, gtin: '4006381333931' });
    expect(ok.status).toBe(201);
    expect(ok.body.gtin).toBe('04006381333931');

    const bad = await admin.post('/api/products').send({ name: 'Typo filler', kind: 'filler', unit: 'mL', manufacturer: 'Testmoor Labs', gtin: '4006381333932' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0]).toMatchObject({ path: 'gtin' });
    expect(bad.body.error.details[0].message).toMatch(/check digit/);

    const again = await admin.post('/api/products').send({ name: 'Same box', kind: 'filler', unit: 'mL', manufacturer: 'Testmoor Labs', gtin: '04006381333931' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('GTIN_TAKEN');

    const patched = await admin.patch(`/api/products/${ok.body.id}`).send({ gtin: '09506000134352' });
    expect(patched.body.gtin).toBe('09506000134352');
  });

  it("needs each product in units to name its own units (product labelling: one product's units are not another's)", async () => {
    const none = await admin.post('/api/products').send({ name: 'Unnamed units', kind: 'toxin', unit: 'U', manufacturer: 'Testvale Pharma', packSize: 100 });
    expect(none.status).toBe(400);
    expect(none.body.error.details.map((d: { path: string }) => d.path)).toEqual(['unitLabel']);
    const toxin = await admin.post('/api/products').send({ name: 'Labelled toxin', kind: 'toxin', unit: 'U', unitLabel: 'Testvale units', manufacturer: 'Testvale Pharma', packSize: 100 });
    expect(toxin.status).toBe(201);
    const cleared = await admin.patch(`/api/products/${toxin.body.id}`).send({ unitLabel: null });
    expect(cleared.status).toBe(400);
  });

  it('keeps hyaluronidase as a product in units, not offered for a treatment line', async () => {
    const mismatch = await admin.post('/api/products').send({ name: 'Enzyme', kind: 'hyaluronidase', unit: 'mL', manufacturer: 'Fenwell Laboratories' });
    expect(mismatch.status).toBe(400);
    const h = await admin.post('/api/products').send({ name: 'Test hyaluronidase', kind: 'hyaluronidase', unit: 'U', unitLabel: 'Fenwell units', manufacturer: 'Fenwell Laboratories', packSize: 1500 });
    expect(h.status).toBe(201);
    expect((await prac.get('/api/products')).body.find((p: Product) => p.id === h.body.id)).toMatchObject({ kind: 'hyaluronidase', unitLabel: 'Fenwell units' });

    // The database keeps the kind-unit pair too, whatever writes it.
    await expect(t.db.query(`UPDATE "product" SET "unit" = 'mL' WHERE "id" = ?`, [h.body.id])).rejects.toThrow(/CHECK/);

    const patient = await createPatient(t.db);
    const visit = await createVisit(prac, patient.id, practitionerId);
    const res = await prac.put(`/api/visits/${visit.id}/treatment`).send({ lines: [{ productId: h.body.id, unit: 'U', doses: [{ zone: 'upper-body', amount: 10 }] }] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('NOT_A_TREATMENT_PRODUCT');
  });
});
