import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentEvidence } from '../../server/entities/consent-evidence.js';
import { Patient as PatientEntity, type Patient } from '../../server/entities/patient.js';
import type { Product } from '../../server/entities/product.js';
import type { User } from '../../server/entities/user.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { createProducts, createVisit, insertScreening, treatmentRowCounts } from '../helpers/treatments.js';
import { newId } from '../../server/lib/time.js';

let t: TestApp;
let admin: Client;
let prac: Client;
let practitioner: User;
let coord: Client;
let products: Awaited<ReturnType<typeof createProducts>>;

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  ({ client: prac, user: practitioner } = await signedIn(t, 'practitioner'));
  coord = (await signedIn(t, 'coordinator')).client;
  products = await createProducts(admin);
});
afterAll(() => t.close());

const fillerLine = (p: Product, doses: [string, number][], extra: Record<string, unknown> = {}) => ({
  productId: p.id,
  unit: 'mL',
  lotNumber: 'TS-2291A',
  expiryDate: '2099-12-31',
  doses: doses.map(([zone, amount]) => ({ zone, amount })),
  techniques: ['linear-threading'],
  device: 'needle',
  gauge: 30,
  depth: 'submucosal',
  ...extra,
});

async function freshVisit(startsAt?: string): Promise<{ patient: Patient; visitId: string }> {
  const patient = await createPatient(t.db);
  const visit = await createVisit(prac, patient.id, practitioner.id, startsAt);
  return { patient, visitId: visit.id };
}

describe('product catalogue', () => {
  it('keeps kind and unit together', async () => {
    const bad = await admin.post('/api/products').send({ name: 'Odd', kind: 'filler', unit: 'U', manufacturer: 'X' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe('unit');
    const list = await prac.get('/api/products');
    expect(list.body.map((p: Product) => p.name)).toEqual(['Test firm HA filler', 'Test soft HA filler', 'Test neuromodulator']);
  });

  it('hides inactive products from the picker but keeps them listed for admins', async () => {
    const p = await admin.post('/api/products').send({ name: 'Old filler', kind: 'filler', unit: 'mL', manufacturer: 'X' });
    await admin.patch(`/api/products/${p.body.id}`).send({ active: false });
    expect((await prac.get('/api/products')).body.some((x: Product) => x.id === p.body.id)).toBe(false);
    expect((await admin.get('/api/products?all=1')).body.some((x: Product) => x.id === p.body.id)).toBe(true);
    const { visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({ lines: [fillerLine(p.body, [['upper-body', 0.5]])] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('UNKNOWN_PRODUCT');
  });
});

describe('treatment settings', () => {
  it('tells the treatment screen its thresholds', async () => {
    const res = await prac.get('/api/treatment-settings');
    // Defaults: above 2 mL per session warns; review at 14 days, maintenance at 6 months (FACTS 17, common practice).
    expect(res.body).toMatchObject({ highVolumeMl: 2, lotWarnDays: 30, reviewDays: 14, maintenanceMonths: 6, timeZone: 'Europe/London' });
    expect(res.body.limits.fillerPerZoneMl).toBe(2);
  });
});

describe('recording a treatment', () => {
  it('stores lines, doses per zone and totals, and plans the reminders', async () => {
    const { patient, visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({
      anaesthetic: 'topical',
      adverseEvents: ['swelling'],
      lines: [
        fillerLine(products.soft, [['upper-body', 0.3], ['lower-body', 0.3], ['cupids-bow', 0.05], ['upper-vermilion-border', 0.15]]),
        fillerLine(products.firm, [['upper-body', 0.1], ['lower-body', 0.1]], { techniques: ['serial-puncture', 'vertical-tenting'], device: 'cannula', gauge: 25 }),
        { productId: products.toxin.id, unit: 'U', lotNumber: 'NM-88', expiryDate: '2099-01', doses: [{ zone: 'dao-right', amount: 3 }, { zone: 'dao-left', amount: 3.5 }], depth: 'intramuscular' },
      ],
    });
    expect(res.status).toBe(201);
    // Hand-computed: 0.3 + 0.3 + 0.05 + 0.15 = 0.8 mL, + 0.1 + 0.1 = 1.0 mL: one 1 mL syringe (FACTS 17, common practice).
    expect(res.body.totals.fillerMl).toBe(1);
    expect(res.body.totals.fillerMlByZone['upper-body']).toBe(0.4);
    expect(res.body.totals.toxinUBySide).toEqual({ right: 3, left: 3.5 });
    expect(res.body.lines.map((l: { total: number }) => l.total)).toEqual([0.8, 0.2, 6.5]);
    expect(res.body.lines[2].expiryDate).toBe('2099-01-31');
    expect(res.body.lines[0]).toMatchObject({ productName: 'Test soft HA filler', manufacturer: 'Testmoor Labs', unit: 'mL', lotNumber: 'TS-2291A' });
    // No screening questionnaire on file: allowed, with a warning.
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toEqual(['NO_SCREENING']);
    expect(res.body.reminders.map((r: { kind: string }) => r.kind)).toEqual(['review', 'maintenance']);

    const again = await prac.get(`/api/visits/${visitId}/treatment`);
    expect(again.body.totals).toEqual(res.body.totals);
    const audit = await t.db.getRepository(AuditEvent).findBy({ action: 'treatment.create', patientId: patient.id });
    expect(audit).toHaveLength(1);
    expect(JSON.parse(audit[0].details).lines[0]).toMatchObject({ lot: 'TS-2291A', total: 0.8, unit: 'mL' });
  });

  it('adds up a patient over visits', async () => {
    const patient = await createPatient(t.db);
    const v1 = await createVisit(prac, patient.id, practitioner.id, '2025-01-10T10:00:00Z');
    const v2 = await createVisit(prac, patient.id, practitioner.id, '2025-01-31T10:00:00Z');
    await prac.put(`/api/visits/${v2.id}/treatment`).send({ treatedAt: '2025-01-31T10:15:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.1], ['cupids-bow', 0.2]])] });
    await prac.put(`/api/visits/${v1.id}/treatment`).send({ treatedAt: '2025-01-10T10:15:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.4], ['lower-body', 0.6]])] });
    const res = await prac.get(`/api/patients/${patient.id}/treatments`);
    expect(res.status).toBe(200);
    // Hand-computed: 1.0 mL, then a 3-week top-up of 0.3 mL → 1.3 mL; upper body 0.4 + 0.1 = 0.5 mL.
    expect(res.body.treatments.map((x: { cumulative: { fillerMl: number } }) => x.cumulative.fillerMl)).toEqual([1, 1.3]);
    expect(res.body.total.fillerMlByZone).toEqual({ 'upper-body': 0.5, 'lower-body': 0.6, 'cupids-bow': 0.2 });
  });

  it('warns about a high session volume and a missing lot, but records them', async () => {
    const { visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({
      lines: [fillerLine(products.soft, [['upper-body', 1], ['lower-body', 1]]), fillerLine(products.firm, [['cupids-bow', 0.1]], { lotNumber: null, expiryDate: null })],
    });
    expect(res.status).toBe(201);
    const codes = res.body.warnings.map((w: { code: string }) => w.code);
    expect(codes).toContain('HIGH_VOLUME');
    expect(codes).toContain('LOT_MISSING');
  });

  it('replaces the lines on correction and keeps one set of reminders', async () => {
    const { visitId } = await freshVisit();
    const first = await prac.put(`/api/visits/${visitId}/treatment`).send({ lines: [fillerLine(products.soft, [['upper-body', 0.5]])] });
    const second = await prac.put(`/api/visits/${visitId}/treatment`).send({ reviewAfterDays: 21, lines: [fillerLine(products.soft, [['upper-body', 0.4]]), fillerLine(products.firm, [['lower-body', 0.2]])] });
    expect(first.status).toBe(201);
    expect(second.status).toBe(200);
    expect(second.body.id).toBe(first.body.id);
    expect(second.body.totals.fillerMl).toBe(0.6);
    expect(second.body.reminders).toHaveLength(2);
    const review = second.body.reminders.find((r: { kind: string }) => r.kind === 'review');
    const firstReview = first.body.reminders.find((r: { kind: string }) => r.kind === 'review');
    const days = (Date.parse(review.dueOn) - Date.parse(firstReview.dueOn)) / 86_400_000;
    expect(days).toBe(7);
    const toxinOnly = await prac.put(`/api/visits/${visitId}/treatment`).send({ lines: [{ productId: products.toxin.id, unit: 'U', lotNumber: 'N1', expiryDate: '2099-01-01', doses: [{ zone: 'dao-left', amount: 2 }] }] });
    const maintenance = toxinOnly.body.reminders.find((r: { kind: string }) => r.kind === 'maintenance');
    expect(maintenance.state).toBe('cancelled');
  });
});

describe('lot expiry', () => {
  it('refuses an expired lot and stores nothing', async () => {
    const { visitId } = await freshVisit();
    const before = await treatmentRowCounts(t.db);
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({ treatedAt: '2025-06-11T10:00:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.5]], { expiryDate: '2025-06-10' })] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('LOT_EXPIRED');
    expect(res.body.error.details[0].path).toBe('lines.0.expiryDate');
    expect(await treatmentRowCounts(t.db)).toEqual(before);
  });

  it('accepts a lot on its expiry day, with a warning', async () => {
    const { visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({ treatedAt: '2025-06-10T16:00:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.5]], { expiryDate: '2025-06-10' })] });
    expect(res.status).toBe(201);
    expect(res.body.lines[0].lot).toEqual({ state: 'expires-soon', daysLeft: 0 });
    expect(res.body.warnings.find((w: { code: string }) => w.code === 'LOT_EXPIRES_SOON').message).toMatch(/expires on the treatment day/);
  });

  it('warns 30 days ahead and not 31', async () => {
    const { visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({
      treatedAt: '2025-06-10T10:00:00Z',
      lines: [fillerLine(products.soft, [['upper-body', 0.2]], { expiryDate: '2025-07-10' }), fillerLine(products.firm, [['lower-body', 0.2]], { expiryDate: '2025-07-11' })],
    });
    expect(res.body.lines.map((l: { lot: { state: string } }) => l.lot.state)).toEqual(['expires-soon', 'ok']);
  });

  it("judges expiry by the clinic's calendar day (Europe/London)", async () => {
    // 23:30 UTC on 31 March 2025 is 00:30 on 1 April in London (BST): a lot expiring on 31 March is past its date there.
    const { visitId } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({ treatedAt: '2025-03-31T23:30:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.2]], { expiryDate: '2025-03-31' })] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('LOT_EXPIRED');
    const ok = await prac.put(`/api/visits/${visitId}/treatment`).send({ treatedAt: '2025-03-31T22:30:00Z', lines: [fillerLine(products.soft, [['upper-body', 0.2]], { expiryDate: '2025-03-31' })] });
    expect(ok.status).toBe(201);
    expect(ok.body.treatedOn).toBe('2025-03-31');
  });
});

describe('bad input is refused with a clear 400 and nothing stored', () => {
  const cases: [string, (v: { soft: Product; toxin: Product }) => unknown, string][] = [
    ['a negative volume', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', -0.2]])] }), 'lines.0.doses.0.amount'],
    ['50 mL in one zone', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 50]])] }), 'lines.0.doses.0.amount'],
    ['6 mL on one line', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 2], ['lower-body', 2], ['cupids-bow', 2]])] }), 'lines.0.doses'],
    ['units on a filler line', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.5]], { unit: 'U' })] }), 'lines.0.unit'],
    ['mL on a toxin line', ({ toxin }) => ({ lines: [{ productId: toxin.id, unit: 'mL', doses: [{ zone: 'dao-left', amount: 2 }] }] }), 'lines.0.unit'],
    ['a zone unknown to the diagram', ({ soft }) => ({ lines: [fillerLine(soft, [['nasolabial-fold', 0.5]])] }), 'lines.0.doses.0.zone'],
    ['toxin zone on a filler line', ({ soft }) => ({ lines: [fillerLine(soft, [['dao-left', 0.5]])] }), 'lines.0.doses.0.zone'],
    ['a lot number with a tab', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.5]], { lotNumber: 'AB\t12' })] }), 'lines.0.lotNumber'],
    ['a lot number with CR LF', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.5]], { lotNumber: 'AB12\r\n' })] }), 'lines.0.lotNumber'],
    ['a lot number with a zero-width space', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.5]], { lotNumber: 'AB\u200B12' })] }), 'lines.0.lotNumber'],
    ['a zone twice on one line', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.2], ['upper-body', 0.3]])] }), 'lines.0.doses.1.zone'],
    ['three decimals', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.125]])] }), 'lines.0.doses.0.amount'],
    ['no lines', () => ({ lines: [] }), 'lines'],
    ['an unknown field', ({ soft }) => ({ lines: [fillerLine(soft, [['upper-body', 0.2]])], dose: 'lots' }), ''],
    ['a review after 6 weeks', ({ soft }) => ({ reviewAfterDays: 42, lines: [fillerLine(soft, [['upper-body', 0.2]])] }), 'reviewAfterDays'],
    ['a time in the future', ({ soft }) => ({ treatedAt: '2099-01-01T10:00:00Z', lines: [fillerLine(soft, [['upper-body', 0.2]])] }), 'treatedAt'],
  ];

  for (const [name, body, path] of cases) {
    it(name, async () => {
      const { visitId } = await freshVisit();
      const before = await treatmentRowCounts(t.db);
      const res = await prac.put(`/api/visits/${visitId}/treatment`).send(body(products) as object);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toEqual(expect.any(String));
      expect(res.body.error.details.map((d: { path: string }) => d.path)).toContain(path);
      expect(await treatmentRowCounts(t.db)).toEqual(before);
      expect((await prac.get(`/api/visits/${visitId}/treatment`)).status).toBe(404);
    });
  }
});

describe('screening review', () => {
  it('blocks the treatment until each flag is acknowledged with a note, and logs the acknowledgement', async () => {
    const { patient, visitId } = await freshVisit();
    const record = await insertScreening(t.db, patient.id, ['blood-thinners', 'dental-work']);
    const body = { lines: [fillerLine(products.soft, [['upper-body', 0.5]])] };

    const before = await treatmentRowCounts(t.db);
    const blocked = await prac.put(`/api/visits/${visitId}/treatment`).send(body);
    expect(blocked.status).toBe(409);
    expect(blocked.body.error.code).toBe('SCREENING_FLAGS_UNACKNOWLEDGED');
    expect(blocked.body.error.details.questionIds.sort()).toEqual(['blood-thinners', 'dental-work']);
    expect(await treatmentRowCounts(t.db)).toEqual(before);

    const review = await prac.get(`/api/visits/${visitId}/screening`);
    expect(review.body.screening.flags.map((f: { questionId: string; answer: string; acknowledged: boolean }) => [f.questionId, f.answer, f.acknowledged])).toEqual([
      ['blood-thinners', 'yes', false],
      ['dental-work', 'yes', false],
    ]);
    expect(review.body.screening.answers.find((a: { questionId: string }) => a.questionId === 'pregnant-breastfeeding')).toMatchObject({ answer: 'no', flagged: false });

    const oneNote = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'blood-thinners', note: 'Low-dose aspirin; discussed bruising risk.' }] });
    expect(oneNote.status).toBe(400);
    const emptyNote = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'blood-thinners', note: ' ' }, { questionId: 'dental-work', note: 'x' }] });
    expect(emptyNote.status).toBe(400);
    const notFlagged = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'under-18', note: 'Not flagged at all.' }] });
    expect(notFlagged.status).toBe(400);
    expect(await t.db.getRepository(ConsentEvidence).countBy({ consentId: record.id })).toBe(0);

    const ack = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({
      consentId: record.id,
      notes: [
        { questionId: 'blood-thinners', note: 'Low-dose aspirin; discussed bruising risk.' },
        { questionId: 'dental-work', note: 'Check-up only, no procedure; proceed.' },
      ],
    });
    expect(ack.status).toBe(200);
    expect(ack.body.screening.allAcknowledged).toBe(true);
    expect(ack.body.screening.flags[1]).toMatchObject({ note: 'Check-up only, no procedure; proceed.', acknowledgedByName: 'Test practitioner' });

    const logged = await t.db.getRepository(AuditEvent).findOneByOrFail({ action: 'consent.flags_acknowledge', targetId: record.id });
    expect(logged).toMatchObject({ actorId: practitioner.id, actorRole: 'practitioner', patientId: patient.id });
    expect(JSON.parse(logged.details).questionIds.sort()).toEqual(['blood-thinners', 'dental-work']);

    const ok = await prac.put(`/api/visits/${visitId}/treatment`).send(body);
    expect(ok.status).toBe(201);
    expect(ok.body.warnings).toEqual([]);
  });

  it('accepts the consent record\'s own single-note acknowledgement, and refuses a second review', async () => {
    const { patient, visitId } = await freshVisit();
    const record = await insertScreening(t.db, patient.id, ['cold-sore-history']);
    const viaConsents = await prac.post(`/api/consents/${record.id}/acknowledge-flags`).send({ note: 'Antiviral cover arranged.' });
    expect(viaConsents.status).toBe(200);
    const review = await prac.get(`/api/visits/${visitId}/screening`);
    expect(review.body.screening.flags[0]).toMatchObject({ questionId: 'cold-sore-history', acknowledged: true, note: 'Antiviral cover arranged.' });
    const again = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'cold-sore-history', note: 'Again.' }] });
    expect(again.status).toBe(409);
    expect((await prac.put(`/api/visits/${visitId}/treatment`).send({ lines: [fillerLine(products.soft, [['upper-body', 0.2]])] })).status).toBe(201);
  });

  it('shows per-flag acknowledgements on the consent record too', async () => {
    const { patient, visitId } = await freshVisit();
    const record = await insertScreening(t.db, patient.id, ['vaccination']);
    await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'vaccination', note: 'Flu jab 3 weeks ago; fine.' }] });
    const consent = await prac.get(`/api/consents/${record.id}`);
    expect(consent.body.flagsAcknowledgedAt).toEqual(expect.any(String));
    expect((await prac.post(`/api/consents/${record.id}/acknowledge-flags`).send({ note: 'twice' })).status).toBe(409);
  });

  it('treats a withdrawn latest questionnaire as none on file', async () => {
    const { patient, visitId } = await freshVisit();
    await insertScreening(t.db, patient.id, [], '2025-01-01T10:00:00.000Z');
    const latest = await insertScreening(t.db, patient.id, ['pregnant-breastfeeding']);
    // A withdrawal is recorded after its evidence row (the database refuses it otherwise).
    await t.db.query(`INSERT INTO "consent_evidence" ("id", "consentId", "at", "event", "actorId", "actorRole", "details") VALUES (?, ?, ?, 'consent.withdrawn', ?, 'practitioner', '{}')`, [newId(), latest.id, new Date().toISOString(), practitioner.id]);
    await t.db.query(`UPDATE "consent_record" SET "withdrawnAt" = ?, "withdrawnById" = ?, "withdrawalReason" = ?, "withdrawalDate" = ? WHERE "id" = ?`, [new Date().toISOString(), practitioner.id, 'entered in error', '2025-06-01', latest.id]);
    expect((await prac.get(`/api/visits/${visitId}/screening`)).body.screening).toBeNull();
    const res = await prac.put(`/api/visits/${visitId}/treatment`).send({ lines: [fillerLine(products.soft, [['upper-body', 0.2]])] });
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toEqual(['NO_SCREENING']);
  });

  it("refuses another patient's questionnaire", async () => {
    const { visitId } = await freshVisit();
    const other = await createPatient(t.db);
    const record = await insertScreening(t.db, other.id, ['blood-thinners']);
    const res = await prac.post(`/api/visits/${visitId}/screening/acknowledge`).send({ consentId: record.id, notes: [{ questionId: 'blood-thinners', note: 'Seen and discussed.' }] });
    expect(res.status).toBe(400);
  });

  it('is hidden from coordinators, as is the treatment', async () => {
    const { visitId } = await freshVisit();
    expect((await coord.get(`/api/visits/${visitId}/screening`)).status).toBe(403);
    expect((await coord.get(`/api/visits/${visitId}/treatment`)).status).toBe(403);
  });
});

describe('consultation', () => {
  it('records goals, a target ratio and a staged plan', async () => {
    const { visitId, patient: { id: patientId } } = await freshVisit();
    const res = await prac.put(`/api/visits/${visitId}/consultation`).send({
      goals: ['more-volume', 'cupids-bow-definition'],
      goalsText: 'Wants a fuller upper lip without looking overdone.',
      targetRatio: '1:1.6',
      plan: [
        { label: '1 mL today', plannedDate: '2026-05-01', plannedAmountMl: 1 },
        { label: 'Review, top-up if needed', plannedDate: '2026-05-22' },
      ],
    });
    expect(res.status).toBe(201);
    expect(res.body.plan[1]).toEqual({ label: 'Review, top-up if needed', plannedDate: '2026-05-22', plannedAmountMl: null });
    const bad = await prac.put(`/api/visits/${visitId}/consultation`).send({ goals: ['more-volume'], targetRatio: 'custom' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe('customRatio');
    const custom = await prac.put(`/api/visits/${visitId}/consultation`).send({ goals: [], goalsText: 'Even lips', targetRatio: 'custom', customRatio: 1.3 });
    expect(custom.status).toBe(200);
    expect((await prac.get(`/api/visits/${visitId}/consultation`)).body).toMatchObject({ targetRatio: 'custom', customRatio: 1.3, goals: [] });
    // The choice is the patient's lip-ratio target that the measurements use.
    const row = await t.db.getRepository(PatientEntity).findOneOrFail({ where: { id: patientId }, select: { id: true, lipRatioTarget: true } });
    expect(row.lipRatioTarget).toBe(1.3);
  });
});
