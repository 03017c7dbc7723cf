import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import type { Product } from '../../server/entities/product.js';
import { addDays, dayIn } from '../../server/lib/time.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { createProducts, createVisit } from '../helpers/treatments.js';

let t: TestApp;
let admin: Client;
let prac: Client;
let prac2: Client;
let coord: Client;
let pracId: string;
let prac2Id: string;
let products: Awaited<ReturnType<typeof createProducts>>;
let enzyme: Product;
const today = () => dayIn('Europe/London');

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  ({ client: prac, user: { id: pracId } } = await signedIn(t, 'practitioner'));
  ({ client: prac2, user: { id: prac2Id } } = await signedIn(t, 'practitioner'));
  coord = (await signedIn(t, 'coordinator')).client;
  products = await createProducts(admin);
  enzyme = (await admin.post('/api/products').send({ name: 'Test hyaluronidase', kind: 'hyaluronidase', unit: 'U', unitLabel: 'Fenwell units', manufacturer: 'Fenwell Laboratories', packSize: 1500 })).body;
});
afterAll(() => t.close());

const receive = (c: Client, body: Record<string, unknown>) => c.post('/api/stock/lots').send(body);
const counts = async () => ({
  lots: Number((await t.db.query(`SELECT COUNT(*) AS n FROM "stock_lot"`))[0].n),
  movements: Number((await t.db.query(`SELECT COUNT(*) AS n FROM "stock_movement"`))[0].n),
});

describe('receiving and counting stock', () => {
  it('receives a lot in packs, adds a second delivery of the same lot, and logs both', async () => {
    const first = await receive(prac, { productId: products.soft.id, lotNumber: 'ST-1001', expiryDate: '2099-06', quantity: 4 });
    expect(first.status).toBe(201);
    // A month-only expiry is that month's last day (common practice; the same reading as GS1's DD = 00).
    expect(first.body).toMatchObject({ lotNumber: 'ST-1001', expiryDate: '2099-06-30', onHand: 4, productName: 'Test soft HA filler', status: { state: 'ok' } });
    const second = await receive(prac, { productId: products.soft.id, lotNumber: 'ST-1001', expiryDate: '2099-06-30', quantity: 2 });
    expect(second.status).toBe(200);
    expect(second.body.onHand).toBe(6);
    const logged = await t.db.getRepository(AuditEvent).findBy({ action: 'stock.receive', targetId: first.body.id });
    expect(logged).toHaveLength(2);
  });

  it('refuses the same lot with another expiry, and a count below zero, writing nothing', async () => {
    const lot = (await receive(prac, { productId: products.firm.id, lotNumber: 'ST-2002', expiryDate: '2099-01-31', quantity: 2 })).body;
    const before = await counts();
    const mismatch = await receive(prac, { productId: products.firm.id, lotNumber: 'ST-2002', expiryDate: '2099-02-28', quantity: 1 });
    expect(mismatch.status).toBe(409);
    expect(mismatch.body.error.code).toBe('LOT_EXPIRY_MISMATCH');

    const tooMany = await prac.post(`/api/stock/lots/${lot.id}/adjust`).send({ delta: -3, reason: 'discarded', note: 'dropped, seal broken' });
    expect(tooMany.status).toBe(409);
    expect(tooMany.body.error).toMatchObject({ code: 'STOCK_INSUFFICIENT' });
    expect(tooMany.body.error.message).toMatch(/has 2 packs in stock, not 3/);
    expect(await counts()).toEqual(before);

    const ok = await prac.post(`/api/stock/lots/${lot.id}/adjust`).send({ delta: -2, reason: 'discarded', note: 'dropped, seal broken' });
    expect(ok.body.onHand).toBe(0);
    const detail = await prac.get(`/api/stock/lots/${lot.id}`);
    expect(detail.body.movements.map((m: { delta: number; reason: string }) => [m.delta, m.reason])).toEqual([[2, 'received'], [-2, 'discarded']]);
  });

  it('keeps the rules in the database too: no negative count, an append-only ledger', async () => {
    const lot = (await receive(prac, { productId: products.toxin.id, lotNumber: 'ST-3003', expiryDate: '2099-01-31', quantity: 1 })).body;
    await expect(t.db.query(`UPDATE "stock_lot" SET "onHand" = -1 WHERE "id" = ?`, [lot.id])).rejects.toThrow(/CHECK/);
    await expect(t.db.query(`UPDATE "stock_movement" SET "delta" = 5 WHERE "lotId" = ?`, [lot.id])).rejects.toThrow(/append-only/);
    await expect(t.db.query(`DELETE FROM "stock_movement" WHERE "lotId" = ?`, [lot.id])).rejects.toThrow(/append-only/);
  });

  it('refuses bad input with the field named', async () => {
    const bad = await receive(prac, { productId: products.soft.id, lotNumber: 'ST\u0009TAB', expiryDate: '2099-13', quantity: 0 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['expiryDate', 'lotNumber', 'quantity']);
  });

  it('lets the front desk see the shelf but not change it', async () => {
    expect((await coord.get('/api/stock')).status).toBe(200);
    expect((await receive(coord, { productId: products.soft.id, lotNumber: 'ST-9', expiryDate: '2099-01-31', quantity: 1 })).status).toBe(403);
  });
});

describe('expiry on the clinic day', () => {
  it('lists expired and expiring lots that are still on the shelf (30 days warns, 31 does not)', async () => {
    const day = today();
    await receive(prac, { productId: products.soft.id, lotNumber: 'EX-PAST', expiryDate: addDays(day, -1), quantity: 1 });
    await receive(prac, { productId: products.soft.id, lotNumber: 'EX-TODAY', expiryDate: day, quantity: 1 });
    await receive(prac, { productId: products.soft.id, lotNumber: 'EX-30', expiryDate: addDays(day, 30), quantity: 1 });
    await receive(prac, { productId: products.soft.id, lotNumber: 'EX-31', expiryDate: addDays(day, 31), quantity: 1 });
    const gone = (await receive(prac, { productId: products.soft.id, lotNumber: 'EX-GONE', expiryDate: addDays(day, -5), quantity: 1 })).body;
    await prac.post(`/api/stock/lots/${gone.id}/adjust`).send({ delta: -1, reason: 'discarded', note: 'expired, binned' });

    const alerts = (await coord.get('/api/stock/alerts')).body;
    expect(alerts.date).toBe(day);
    expect(alerts.expired.map((l: { lotNumber: string }) => l.lotNumber)).toEqual(['EX-PAST']);
    expect(alerts.expiringSoon.map((l: { lotNumber: string }) => l.lotNumber)).toEqual(['EX-TODAY', 'EX-30']);
    expect(alerts.expiringSoon[0].status).toEqual({ state: 'expires-soon', daysLeft: 0 });
  });
});

describe('emergency kit', () => {
  it('says when no in-date hyaluronidase is held, then how long the kit is in date', async () => {
    const day = today();
    expect((await prac.get('/api/stock/emergency-kit')).body).toMatchObject({ state: 'none', inDateUntil: null, vials: 0 });

    await receive(prac, { productId: enzyme.id, lotNumber: 'HY-OLD', expiryDate: addDays(day, -2), quantity: 3 });
    expect((await prac.get('/api/stock/emergency-kit')).body.state).toBe('none');

    await receive(prac, { productId: enzyme.id, lotNumber: 'HY-SOON', expiryDate: addDays(day, 10), quantity: 1 });
    expect((await prac.get('/api/stock/emergency-kit')).body).toMatchObject({ state: 'expires-soon', inDateUntil: addDays(day, 10), vials: 1 });

    await receive(prac, { productId: enzyme.id, lotNumber: 'HY-NEW', expiryDate: addDays(day, 400), quantity: 2 });
    expect((await prac.get('/api/stock/emergency-kit')).body).toMatchObject({ state: 'ok', inDateUntil: addDays(day, 400), vials: 3 });
    // On a later clinic day the soon lot has expired; the new one still counts.
    expect((await prac.get(`/api/stock/emergency-kit?date=${addDays(day, 11)}`)).body).toMatchObject({ state: 'ok', vials: 2 });
  });
});

describe('monthly usage', () => {
  const line = (p: Product, doses: [string, number][]) => ({
    productId: p.id,
    unit: p.unit,
    lotNumber: 'US-1',
    expiryDate: '2099-12-31',
    doses: doses.map(([zone, amount]) => ({ zone, amount })),
  });
  const treat = async (c: Client, practitionerId: string, treatedAt: string, lines: ReturnType<typeof line>[]) => {
    const patient = await createPatient(t.db);
    const visit = await createVisit(c, patient.id, practitionerId, treatedAt);
    const res = await c.put(`/api/visits/${visit.id}/treatment`).send({ treatedAt, lines });
    if (res.status !== 201) throw new Error(JSON.stringify(res.body));
  };

  it('adds up each product per practitioner per month and never adds one product to another', async () => {
    // Hand-computed: Jan prac soft 0.5 + 0.3 = 0.8 mL in 2 treatments; toxin 3 + 3 = 6 U; Feb prac2 firm 1.0 mL; toxin2 (another product) 4 U.
    const toxin2 = (await admin.post('/api/products').send({ name: 'Other neuromodulator', kind: 'toxin', unit: 'U', unitLabel: 'Otherwick units', manufacturer: 'Otherwick', packSize: 50 })).body as Product;
    await treat(prac, pracId, '2025-01-10T10:00:00Z', [line(products.soft, [['upper-body', 0.2], ['lower-body', 0.3]]), line(products.toxin, [['dao-left', 3], ['dao-right', 3]])]);
    await treat(prac, pracId, '2025-01-31T23:30:00Z', [line(products.soft, [['upper-body', 0.3]])]); // 31 Jan 23:30 UTC is 31 Jan in London (GMT)
    await treat(prac2, prac2Id, '2025-02-03T10:00:00Z', [line(products.firm, [['upper-body', 0.5], ['lower-body', 0.5]]), line(toxin2, [['dao-left', 2], ['dao-right', 2]])]);

    const report = (await admin.get('/api/stock/usage?from=2025-01&to=2025-03')).body;
    expect(report.months).toEqual(['2025-01', '2025-02', '2025-03']);
    const rows = report.rows.map((r: { month: string; productName: string; practitionerId: string; amount: number; unit: string; treatments: number }) => [r.month, r.productName, r.practitionerId === pracId ? 'prac' : 'prac2', r.amount, r.unit, r.treatments]);
    expect(rows).toEqual([
      ['2025-01', 'Test neuromodulator', 'prac', 6, 'U', 1],
      ['2025-01', 'Test soft HA filler', 'prac', 0.8, 'mL', 2],
      ['2025-02', 'Other neuromodulator', 'prac2', 4, 'U', 1],
      ['2025-02', 'Test firm HA filler', 'prac2', 1, 'mL', 1],
    ]);
    expect((await admin.get('/api/stock/usage?from=2025-03&to=2025-01')).status).toBe(400);
    expect((await coord.get('/api/stock/usage?from=2025-01&to=2025-03')).status).toBe(403);
  });
});
