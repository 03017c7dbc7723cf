import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Patient } from '../../server/entities/patient.js';
import { resumeErasures } from '../../server/features/patient-data/erasure.js';
import { newId, nowIso } from '../../server/lib/time.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, demoForms, handOver, signaturePng } from '../helpers/consents.js';
import { bucketKeys, patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

let t: TestApp;
let admin: Client;
let adminId: string;
let practitioner: Client;
let practitionerId: string;

beforeAll(async () => {
  t = await makeTestApp();
  ({ client: admin, user: { id: adminId } } = await signedIn(t, 'admin'));
  ({ client: practitioner, user: { id: practitionerId } } = await signedIn(t, 'practitioner'));
  await admin.patch('/api/settings').send({ retentionYears: 0 });
});
afterAll(() => t.close());

/** A patient with one photo and one signed photography consent (with its evidence rows). */
async function patientWithConsent(firstName: string) {
  const { patient, visit } = await patientWithVisit(t, practitioner, practitionerId);
  await t.db.getRepository(Patient).update(patient.id, { firstName, lastName: 'Journal' });
  expect((await upload(practitioner, visit.id, await photoLikeJpeg(480, 600, firstName.length), { view: 'frontal-rest' })).status).toBe(201);
  const forms = await demoForms(t, adminId);
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, patient.id, [forms.photography.id]);
  const signed = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: `${firstName} Journal`, signature: await signaturePng() });
  expect(signed.status).toBe(201);
  return { patientId: patient.id, consentId: signed.body.consentId as string };
}

const count = async (sql: string, params: unknown[]) => Number((await t.db.query(sql, params))[0].n);

describe('erasure journal (fault: an unfinished erasure)', () => {
  it("keeps every other patient's consent records and evidence undeletable while one erasure is unfinished", async () => {
    const erasing = await patientWithConsent('Ines');
    const other = await patientWithConsent('Odile');
    // An erasure that crashed half-way: its journal row is there, never finished.
    await t.db.query(`INSERT INTO "patient_erasure" ("id", "patientId", "erasedById", "startedAt", "reason") VALUES (?, ?, ?, ?, ?)`, [newId(), erasing.patientId, adminId, nowIso(), 'crashed test erasure']);
    await expect(t.db.query(`DELETE FROM "consent_evidence" WHERE "consentId" = ?`, [other.consentId])).rejects.toThrow(/append-only/);
    await expect(t.db.query(`DELETE FROM "consent_record" WHERE "id" = ?`, [other.consentId])).rejects.toThrow(/immutable/);
    expect(await count(`SELECT count(*) AS n FROM "consent_record" WHERE "id" = ?`, [other.consentId])).toBe(1);
    // Resuming after the crash completes it: every row and object of that patient goes, the journal row is finished.
    await resumeErasures(t.deps);
    expect(await count(`SELECT count(*) AS n FROM "patient" WHERE "id" = ?`, [erasing.patientId])).toBe(0);
    expect(await count(`SELECT count(*) AS n FROM "consent_record" WHERE "patientId" = ?`, [erasing.patientId])).toBe(0);
    expect((await bucketKeys(t)).filter((k) => k.startsWith(`patients/${erasing.patientId}/`))).toEqual([]);
    expect(await count(`SELECT count(*) AS n FROM "patient_erasure" WHERE "finishedAt" IS NULL`, [])).toBe(0);
    expect(await count(`SELECT count(*) AS n FROM "audit_event" WHERE "action" = 'patient.erase' AND "patientId" = ?`, [erasing.patientId])).toBe(1);
    // The other patient is untouched, and its consent still refuses deletion now that nothing is being erased.
    expect(await count(`SELECT count(*) AS n FROM "consent_evidence" WHERE "consentId" = ?`, [other.consentId])).toBeGreaterThan(0);
    await expect(t.db.query(`DELETE FROM "consent_record" WHERE "id" = ?`, [other.consentId])).rejects.toThrow(/immutable/);
  });

  it('erases through the API in journal steps and leaves no unfinished journal row', async () => {
    const p = await patientWithConsent('Thea');
    const res = await admin.delete(`/api/patients/${p.patientId}`).send({ confirmName: 'Thea Journal', reason: 'Request received 2026-11-30' });
    expect(res.status).toBe(200);
    expect(await count(`SELECT count(*) AS n FROM "patient_erasure" WHERE "patientId" = ? AND "finishedAt" IS NOT NULL`, [p.patientId])).toBe(1);
    expect(await count(`SELECT count(*) AS n FROM "patient_erasure" WHERE "finishedAt" IS NULL`, [])).toBe(0);
  });
});

describe('withdrawal evidence', () => {
  it('refuses a withdrawal written straight into the database without its evidence row', async () => {
    const p = await patientWithConsent('Wren');
    await expect(
      t.db.query(`UPDATE "consent_record" SET "withdrawnAt" = ?, "withdrawnById" = ?, "withdrawalReason" = ?, "withdrawalDate" = ? WHERE "id" = ?`, [nowIso(), adminId, 'typed in by hand', nowIso().slice(0, 10), p.consentId]),
    ).rejects.toThrow(/evidence/);
    const withdrawn = await admin.post(`/api/consents/${p.consentId}/withdraw`).send({ reason: 'Patient asked by phone' });
    expect(withdrawn.status).toBe(200);
    expect(await count(`SELECT count(*) AS n FROM "consent_evidence" WHERE "consentId" = ? AND "event" = 'consent.withdrawn'`, [p.consentId])).toBe(1);
  });
});
