import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { Patient } from '../../server/entities/patient.js';
import { signingIdentity } from '../../server/signing/pdf-signing.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, binary, demoForms, handOver, signaturePng } from '../helpers/consents.js';
import { bucketKeys, patientWithVisit, photoLikeJpeg, upload } from '../helpers/photos.js';

let t: TestApp;
let admin: Client;
let adminId: string;
let practitionerId: string;
let practitioner: Client;

beforeAll(async () => {
  // Retention 0 years so erasure is allowed in the tests that do not check the retention rule.
  t = await makeTestApp();
  const a = await signedIn(t, 'admin');
  admin = a.client;
  adminId = a.user.id;
  const p = await signedIn(t, 'practitioner');
  practitioner = p.client;
  practitionerId = p.user.id;
  // The first signature on a fresh database creates the clinic's signing key: done here, not inside a timed test.
  await signingIdentity(t.db, t.config);
});
afterAll(() => t.close());

/** A patient with two photos and one signed photography consent (PDF and signature stored). */
async function patientWithRecords(firstName: string) {
  const { patient, visit } = await patientWithVisit(t, practitioner, practitionerId);
  await t.db.getRepository(Patient).update(patient.id, { firstName, lastName: 'Recordson' });
  for (const [i, view] of ['frontal-rest', 'lips-rest'].entries()) {
    const res = await upload(practitioner, visit.id, await photoLikeJpeg(640, 800, i + firstName.length), { view });
    expect(res.status).toBe(201);
  }
  const forms = await demoForms(t, adminId);
  const staff = (await signedIn(t, 'practitioner')).client;
  const tablet = await handOver(staff, patient.id, [forms.photography.id]);
  const signed = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: `${firstName} Recordson`, signature: await signaturePng() });
  expect(signed.status).toBe(201);
  return { patient: { ...patient, firstName, lastName: 'Recordson' }, visit };
}

function zipEntries(zip: Buffer): { names: string[]; read: (name: string) => string } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-zip-'));
  fs.writeFileSync(path.join(dir, 'x.zip'), zip);
  // Python's zipfile module, a general-purpose reference reader, lists and extracts the archive.
  execFileSync('python3', ['-m', 'zipfile', '-e', path.join(dir, 'x.zip'), path.join(dir, 'out')]);
  const names: string[] = [];
  const walk = (d: string, prefix = '') => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      if (e.isDirectory()) walk(path.join(d, e.name), `${prefix}${e.name}/`);
      else names.push(`${prefix}${e.name}`);
    }
  };
  walk(path.join(dir, 'out'));
  return { names, read: (name) => fs.readFileSync(path.join(dir, 'out', name), 'utf8') };
}

describe('patient data export', () => {
  it("contains every photo master and consent PDF of the patient, and nothing of another patient's", async () => {
    const mine = await patientWithRecords('Ottilie');
    const other = await patientWithRecords('Petra');
    const res = await binary(admin.get(`/api/patients/${mine.patient.id}/export`));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/zip');
    expect(Number(res.headers['x-estimated-bytes'])).toBeGreaterThan(1000);
    const zip = zipEntries(res.body as Buffer);

    const myKeys = (await bucketKeys(t)).filter((k) => k.startsWith(`patients/${mine.patient.id}/`));
    const masters = myKeys.filter((k) => /\/master\.jpg$/.test(k));
    const pdfs = myKeys.filter((k) => k.endsWith('.pdf'));
    expect(masters).toHaveLength(2);
    expect(pdfs.length).toBeGreaterThanOrEqual(1);
    for (const k of myKeys) expect(zip.names).toContain(`files/${k.slice(`patients/${mine.patient.id}/`.length)}`);

    const patientJson = JSON.parse(zip.read('records/patient.json'));
    expect(patientJson).toHaveLength(1);
    expect(patientJson[0].firstName).toBe('Ottilie');
    const everything = zip.names.filter((n) => n.endsWith('.json')).map((n) => zip.read(n)).join('\n');
    expect(everything).toContain(mine.visit.id);
    expect(everything).not.toContain(other.patient.id);
    expect(everything).not.toContain('Petra');
    expect(zip.names.some((n) => n.startsWith('records/consent_record'))).toBe(true);
    expect(zip.names.some((n) => n.startsWith('records/photo'))).toBe(true);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'patient.export', patientId: mine.patient.id })).toBe(1);
  });
});

describe('patient erasure', () => {
  it('refuses inside the retention period and when the typed name does not match', async () => {
    const { patient } = await patientWithRecords('Quinta');
    await admin.patch('/api/settings').send({ retentionYears: 8 });
    const inside = await admin.delete(`/api/patients/${patient.id}`).send({ confirmName: 'Quinta Recordson', reason: 'Request by e-mail, ref 42' });
    expect(inside.status).toBe(409);
    expect(inside.body.error.code).toBe('RETENTION_PERIOD');
    await admin.patch('/api/settings').send({ retentionYears: 0 });
    const wrongName = await admin.delete(`/api/patients/${patient.id}`).send({ confirmName: 'Quinta Someone', reason: 'Request by e-mail, ref 42' });
    expect(wrongName.status).toBe(400);
    expect(wrongName.body.error.code).toBe('NAME_MISMATCH');
    expect(await t.db.getRepository(Patient).existsBy({ id: patient.id })).toBe(true);
    expect((await bucketKeys(t)).some((k) => k.startsWith(`patients/${patient.id}/`))).toBe(true);
  });

  it('removes the objects and the rows (consents included), keeps others, and logs the erasure', async () => {
    await admin.patch('/api/settings').send({ retentionYears: 0 });
    const gone = await patientWithRecords('Rhiannon');
    const kept = await patientWithRecords('Sabine');
    const keptKeys = (await bucketKeys(t)).filter((k) => k.startsWith(`patients/${kept.patient.id}/`));
    const res = await admin.delete(`/api/patients/${gone.patient.id}`).send({ confirmName: '  rhiannon   RECORDSON ', reason: 'Erasure request received 2026-11-30' });
    expect(res.status).toBe(200);
    expect(res.body.rows).toBeGreaterThan(5);
    expect((await bucketKeys(t)).filter((k) => k.startsWith(`patients/${gone.patient.id}/`))).toEqual([]);
    for (const table of ['patient', 'visit', 'photo', 'consent_record']) {
      const column = table === 'patient' ? 'id' : 'patientId';
      const [{ n }] = await t.db.query(`SELECT count(*) AS n FROM "${table}" WHERE "${column}" = ?`, [gone.patient.id]);
      expect(n, table).toBe(0);
    }
    const [{ evidence }] = await t.db.query(`SELECT count(*) AS evidence FROM consent_evidence WHERE consentId NOT IN (SELECT id FROM consent_record)`);
    expect(evidence).toBe(0);
    expect((await bucketKeys(t)).filter((k) => k.startsWith(`patients/${kept.patient.id}/`))).toEqual(keptKeys);
    expect(await t.db.getRepository(Patient).existsBy({ id: kept.patient.id })).toBe(true);
    const log = await t.db.getRepository(AuditEvent).findBy({ action: 'patient.erase', patientId: gone.patient.id });
    expect(log).toHaveLength(1);
    expect(log[0].details).not.toContain('Rhiannon');
    // Outside an erasure, consent records still refuse deletion.
    await expect(t.db.query(`DELETE FROM consent_record WHERE patientId = ?`, [kept.patient.id])).rejects.toThrow(/immutable/);
  });
});
