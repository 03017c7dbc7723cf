import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createReminderScheduler } from '../../server/features/reminders/scheduler.js';
import { createPatient, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';
import { photoLikeJpeg } from '../helpers/photos.js';
import { createProducts, createVisit } from '../helpers/treatments.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

describe("erasing a patient's record", () => {
  it('takes the treatment record, reminders, consultation and reference pictures with it', async () => {
    const { client: admin } = await signedIn(t, 'admin');
    const { client: prac, user } = await signedIn(t, 'practitioner');
    const products = await createProducts(admin);
    const patient = await createPatient(t.db, { firstName: 'Ula', lastName: 'Erasewell', email: 'ula@mail.example' });
    const visit = await createVisit(prac, patient.id, user.id, '2025-02-03T10:00:00Z');
    await prac.put(`/api/visits/${visit.id}/treatment`).send({ treatedAt: '2025-02-03T10:05:00Z', lines: [{ productId: products.soft.id, unit: 'mL', lotNumber: 'E-1', expiryDate: '2099-01-01', doses: [{ zone: 'upper-body', amount: 0.5 }] }] }).expect(201);
    await prac.put(`/api/visits/${visit.id}/consultation`).send({ goals: ['more-volume'] }).expect(201);
    await prac.post(`/api/patients/${patient.id}/reference-pictures`).attach('picture', await photoLikeJpeg(300, 200), { filename: 'a.jpg', contentType: 'image/jpeg' }).expect(201);
    // One reminder already handed to the outbox: a sent reminder may not change, but erasure still removes it.
    expect(await createReminderScheduler({ db: t.db, config: t.config, logger: t.deps.logger, mailer: { kick() {} } }).runOnce(new Date('2025-02-17T09:30:00Z'))).toBe(1);

    await admin.patch('/api/settings').send({ retentionYears: 0 }).expect(200);
    const res = await admin.delete(`/api/patients/${patient.id}`).send({ confirmName: 'Ula Erasewell', reason: 'Erasure request, test' });
    expect(res.status).toBe(200);
    for (const table of ['treatment', 'consultation', 'reminder', 'reference_picture']) {
      const [{ n }] = await t.db.query(`SELECT count(*) AS n FROM "${table}" WHERE "patientId" = ?`, [patient.id]);
      expect(n, table).toBe(0);
    }
    const [{ lines }] = await t.db.query(`SELECT count(*) AS lines FROM "treatment_line" WHERE "treatmentId" NOT IN (SELECT "id" FROM "treatment")`);
    const [{ doses }] = await t.db.query(`SELECT count(*) AS doses FROM "treatment_dose" WHERE "lineId" NOT IN (SELECT "id" FROM "treatment_line")`);
    expect([lines, doses]).toEqual([0, 0]);
    const [{ mails }] = await t.db.query(`SELECT count(*) AS mails FROM "mail_log" WHERE "patientId" = ?`, [patient.id]);
    expect(mails).toBe(0);
    expect(await t.deps.storage.list(`patients/${patient.id}/`)).toEqual([]);
    // The catalogue is the clinic's, not the patient's.
    expect((await prac.get('/api/products')).body).toHaveLength(3);
  });
});
