import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import type { Product } from '../../server/entities/product.js';
import { renderPortrait } from '../../server/media/synthetic-portrait.js';
import { addDays, dayIn } from '../../server/lib/time.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { binary, pdfTool, signatureDictionaries } from '../helpers/consents.js';
import { upload } from '../helpers/photos.js';
import { createProducts, createVisit } from '../helpers/treatments.js';

let t: TestApp;
let admin: Client;
let prac: Client;
let pracId: string;
let products: Awaited<ReturnType<typeof createProducts>>;
let enzyme: Product;

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  ({ client: prac, user: { id: pracId } } = await signedIn(t, 'practitioner'));
  products = await createProducts(admin);
  enzyme = (await admin.post('/api/products').send({ name: 'Test hyaluronidase', kind: 'hyaluronidase', unit: 'U', unitLabel: 'Fenwell units', manufacturer: 'Fenwell Laboratories', packSize: 1500 })).body;
  await admin.patch('/api/settings').send({ complicationProtocol: 'Vascular occlusion protocol: red folder in treatment room 1, kept with the emergency kit.' });
}, 60_000);
afterAll(() => t.close());

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();

/** A patient treated an hour ago with 0.5 mL of filler, through the API. */
async function treated() {
  const patient = await createPatient(t.db, { firstName: 'Ottilie', lastName: 'Onsetworth' });
  const visit = await createVisit(prac, patient.id, pracId, minutesAgo(70));
  const res = await prac.put(`/api/visits/${visit.id}/treatment`).send({
    treatedAt: minutesAgo(60),
    lines: [{ productId: products.soft.id, unit: 'mL', lotNumber: 'CX-5501', expiryDate: '2099-12-31', doses: [{ zone: 'upper-body', amount: 0.3 }, { zone: 'lower-body', amount: 0.2 }] }],
  });
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  return { patient, visit };
}
const rows = async (table: string) => Number((await t.db.query(`SELECT COUNT(*) AS n FROM "${table}"`))[0].n);

describe('starting an episode', () => {
  it('starts from a recorded treatment in one call, and not from a visit without one', async () => {
    const patient = await createPatient(t.db);
    const untreated = await createVisit(prac, patient.id, pracId);
    const none = await prac.post(`/api/visits/${untreated.id}/complications`).send({});
    expect(none.status).toBe(409);
    expect(none.body.error.code).toBe('NO_TREATMENT');

    const { visit } = await treated();
    const res = await prac.post(`/api/visits/${visit.id}/complications`).send({});
    expect(res.status).toBe(201);
    expect(Math.abs(Date.parse(res.body.onsetAt) - Date.now())).toBeLessThan(60_000);
    expect(res.body).toMatchObject({ visitId: visit.id, signs: [], outcome: null, actions: [], followUps: [] });
    expect((await t.db.getRepository(AuditEvent).findBy({ action: 'complication.start', targetId: res.body.id })).length).toBe(1);

    const future = await prac.post(`/api/visits/${visit.id}/complications`).send({ onsetAt: new Date(Date.now() + 3_600_000).toISOString() });
    expect(future.status).toBe(400);
  });
});

describe('actions with their times', () => {
  it('records hyaluronidase with its lot and units and takes the vial off the shelf', async () => {
    const { visit } = await treated();
    const ep = (await prac.post(`/api/visits/${visit.id}/complications`).send({ onsetAt: minutesAgo(30), signs: ['blanching', 'livedo'], signsNotes: 'Upper lip, left of midline.' })).body;
    const lot = (await prac.post('/api/stock/lots').send({ productId: enzyme.id, lotNumber: 'HY-7001', expiryDate: '2099-01-31', quantity: 2 })).body;

    const res = await prac.post(`/api/complications/${ep.id}/actions`).send({ at: minutesAgo(25), kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-7001', amount: 300, description: 'Per the clinic protocol.' });
    expect(res.status).toBe(201);
    expect(res.body.actions[0]).toMatchObject({ kind: 'hyaluronidase', productName: 'Test hyaluronidase', lotNumber: 'HY-7001', expiryDate: '2099-01-31', amount: 300, unitLabel: 'Fenwell units' });
    expect(res.body.warnings).toEqual([]);
    const after = (await prac.get(`/api/stock/lots/${lot.id}`)).body;
    expect(after.onHand).toBe(1);
    expect(after.movements.at(-1)).toMatchObject({ delta: -1, reason: 'used', episodeId: ep.id });

    // From a vial already open: nothing more off the shelf.
    await prac.post(`/api/complications/${ep.id}/actions`).send({ at: minutesAgo(10), kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-7001', amount: 150, packsUsed: 0 });
    expect((await prac.get(`/api/stock/lots/${lot.id}`)).body.onHand).toBe(1);

    // Other care is described in words; the record suggests nothing.
    const care = await prac.post(`/api/complications/${ep.id}/actions`).send({ at: minutesAgo(5), kind: 'referral', description: 'Referred to the on-call prescriber.' });
    expect(care.body.actions.map((a: { kind: string }) => a.kind)).toEqual(['hyaluronidase', 'hyaluronidase', 'referral']);

    // Written once: the database refuses a change.
    await expect(t.db.query(`UPDATE "complication_action" SET "amountMilli" = 1 WHERE "episodeId" = ?`, [ep.id])).rejects.toThrow(/append-only/);
  });

  it('refuses a non-hyaluronidase product, a missing lot, an expired lot and an empty shelf, writing nothing', async () => {
    const { visit } = await treated();
    const ep = (await prac.post(`/api/visits/${visit.id}/complications`).send({})).body;
    const before = { actions: await rows('complication_action'), movements: await rows('stock_movement') };
    const at = minutesAgo(1);
    const filler = await prac.post(`/api/complications/${ep.id}/actions`).send({ at, kind: 'hyaluronidase', productId: products.soft.id, lotNumber: 'X', amount: 10 });
    expect(filler.body.error.code).toBe('NOT_HYALURONIDASE');
    const noLot = await prac.post(`/api/complications/${ep.id}/actions`).send({ at, kind: 'hyaluronidase', productId: enzyme.id, amount: 10 });
    expect(noLot.status).toBe(400);
    expect(noLot.body.error.details.map((d: { path: string }) => d.path)).toEqual(['lotNumber']);
    const yesterday = addDays(dayIn('Europe/London'), -1);
    const expired = await prac.post(`/api/complications/${ep.id}/actions`).send({ at, kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-OLD', expiryDate: yesterday, amount: 10 });
    expect(expired.body.error.code).toBe('LOT_EXPIRED');
    const empty = (await prac.post('/api/stock/lots').send({ productId: enzyme.id, lotNumber: 'HY-EMPTY', expiryDate: '2099-01-31', quantity: 1 })).body;
    await prac.post(`/api/stock/lots/${empty.id}/adjust`).send({ delta: -1, reason: 'discarded', note: 'vial cracked' });
    const movementsAfterDiscard = await rows('stock_movement');
    const shelf = await prac.post(`/api/complications/${ep.id}/actions`).send({ at, kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-EMPTY', amount: 10 });
    expect(shelf.status).toBe(409);
    expect(shelf.body.error.code).toBe('STOCK_INSUFFICIENT');
    const vague = await prac.post(`/api/complications/${ep.id}/actions`).send({ at, kind: 'other-care', description: '  ' });
    expect(vague.status).toBe(400);
    expect(await rows('complication_action')).toBe(before.actions);
    expect(await rows('stock_movement')).toBe(movementsAfterDiscard);
    expect(movementsAfterDiscard).toBe(before.movements + 2);
  });

  it('records a lot that is not on the stock list, with a warning', async () => {
    const { visit } = await treated();
    const ep = (await prac.post(`/api/visits/${visit.id}/complications`).send({})).body;
    const res = await prac.post(`/api/complications/${ep.id}/actions`).send({ at: minutesAgo(1), kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-ELSEWHERE', expiryDate: '2099-05', amount: 75 });
    expect(res.status).toBe(201);
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toEqual(['LOT_NOT_IN_STOCK']);
    expect(res.body.actions[0].expiryDate).toBe('2099-05-31');
  });
});

describe('follow-ups, photos and outcome', () => {
  it('books a follow-up visit whose photos pair with the baseline of the same view; the outcome change is logged in full', async () => {
    const { patient, visit } = await treated();
    const baseline = await upload(prac, visit.id, await renderPortrait({ seed: 41, view: 'lips-rest', lipVolume: 0.4, shot: 0 }, { capturedAt: minutesAgo(75) }), { view: 'lips-rest' });
    expect(baseline.status).toBe(201);
    const ep = (await prac.post(`/api/visits/${visit.id}/complications`).send({ onsetAt: minutesAgo(40), signs: ['blanching'] })).body;

    const fu = await prac.post(`/api/complications/${ep.id}/follow-ups`).send({ at: minutesAgo(2), notes: 'Colour returning.' });
    expect(fu.status).toBe(201);
    const followVisitId = fu.body.followUps[0].visitId;
    expect((await prac.get(`/api/visits/${followVisitId}`)).body).toMatchObject({ kind: 'follow-up', patientId: patient.id, status: 'in-progress' });
    const later = await upload(prac, followVisitId, await renderPortrait({ seed: 41, view: 'lips-rest', lipVolume: 0.5, shot: 1 }, { capturedAt: minutesAgo(1) }), { view: 'lips-rest' });
    expect(later.status).toBe(201);
    const view = (await prac.get(`/api/complications/${ep.id}`)).body;
    expect(view.followUps[0].photos).toEqual([{ viewKey: 'lips-rest', baseline: { id: baseline.body.id, capturedAt: expect.any(String) }, photo: { id: later.body.id, capturedAt: expect.any(String) } }]);

    const closed = await prac.patch(`/api/complications/${ep.id}`).send({ outcome: 'resolved', outcomeNotes: 'Normal colour and refill at review.' });
    expect(closed.body).toMatchObject({ outcome: 'resolved', outcomeAt: expect.any(String) });
    const edit = await t.db.getRepository(AuditEvent).findOneByOrFail({ action: 'complication.edit', targetId: ep.id });
    expect(JSON.parse(edit.details).changes).toEqual({ outcome: { from: null, to: 'resolved' }, outcomeNotes: { from: '', to: 'Normal colour and refill at review.' } });
  });
});

describe('PDF summary', () => {
  it('holds the treatment, signs, timed actions, follow-up, outcome and the protocol pointer, and no doses of its own', async () => {
    const { visit } = await treated();
    const ep = (await prac.post(`/api/visits/${visit.id}/complications`).send({ onsetAt: minutesAgo(30), signs: ['blanching', 'pain-out-of-proportion'] })).body;
    await prac.post(`/api/complications/${ep.id}/actions`).send({ at: minutesAgo(20), kind: 'hyaluronidase', productId: enzyme.id, lotNumber: 'HY-PDF-1', expiryDate: '2099-03-31', amount: 450, packsUsed: 0 });
    await prac.post(`/api/complications/${ep.id}/follow-ups`).send({ at: minutesAgo(5), notes: 'Settling.', bookVisit: false });
    await prac.patch(`/api/complications/${ep.id}`).send({ outcome: 'improving' });

    const res = await binary(prac.get(`/api/complications/${ep.id}/pdf`));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = res.body as Buffer;
    // qpdf and poppler's pdftotext: general-purpose PDF tools read the file back.
    expect(pdfTool(pdf, 'qpdf')).toMatch(/No syntax or stream encoding errors/);
    // Signed by the clinic like its consents: a CMS signature (RFC 5652) over the byte range, checked by poppler's pdfsig.
    expect(pdfTool(pdf, 'pdfsig')).toContain('Signature Validation: Signature is Valid.');
    expect(signatureDictionaries(pdf)[0]['/Reason']).toMatch(/^u:Complication record of Ottilie Onsetworth, onset /);
    const text = pdfTool(pdf, 'pdftotext').replace(/\s+/g, ' ');
    expect(text).toContain('Complication record');
    expect(text).toContain('Ottilie Onsetworth');
    expect(text).toContain('Test soft HA filler');
    expect(text).toContain('lot CX-5501');
    expect(text).toContain('Blanching, Pain out of proportion');
    expect(text).toContain('Hyaluronidase: Test hyaluronidase, lot HY-PDF-1 (expiry 2099-03-31): 450 Fenwell units');
    expect(text).toContain('Settling.');
    expect(text).toContain('Improving');
    expect(text).toContain('Vascular occlusion protocol: red folder in treatment room 1');
    expect(text).toContain('states no doses for emergencies');
    const logged = await t.db.getRepository(AuditEvent).findOneByOrFail({ action: 'complication.pdf', targetId: ep.id });
    expect(JSON.parse(logged.details).bytes).toBe(pdf.length);
  });
});
