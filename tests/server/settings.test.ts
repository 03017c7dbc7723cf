import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClinicSettings } from '../../server/entities/clinic-settings.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';

let t: TestApp;
let admin: Client;

beforeAll(async () => {
  t = await makeTestApp({ TWINFRAME_CLINIC_NAME: 'Harbour Lane Clinic' });
  admin = (await signedIn(t, 'admin')).client;
});
afterAll(() => t.close());

describe('clinic settings', () => {
  it('starts from the environment and trade defaults', async () => {
    const res = await admin.get('/api/settings');
    // Review 2–4 weeks after treatment, maintenance about 6 months: common practice (filler lasts about 6–9 months).
    expect(res.body).toMatchObject({ clinicName: 'Harbour Lane Clinic', idleMinutes: 15, reviewReminderDays: 14, maintenanceReminderMonths: 6 });
  });

  it('saves a change, logs it, and applies the idle timeout to the session cookie', async () => {
    const res = await admin.patch('/api/settings').send({ idleMinutes: 10, watermarkText: 'Harbour Lane' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ idleMinutes: 10, watermarkText: 'Harbour Lane', clinicName: 'Harbour Lane Clinic' });
    const next = await admin.get('/api/auth/me');
    const cookie = String(next.headers['set-cookie']);
    const expires = Date.parse(/Expires=([^;]+)/.exec(cookie)![1]);
    expect(expires - Date.now()).toBeGreaterThan(9 * 60_000);
    expect(expires - Date.now()).toBeLessThanOrEqual(10 * 60_000 + 1000);
  });

  it('is what the clinic day and the session use from then on', async () => {
    await admin.patch('/api/settings').send({ timeZone: 'America/New_York', clinicName: 'Harbour Lane Aesthetics' });
    expect((await admin.get('/api/clinic-day')).body.timeZone).toBe('America/New_York');
    expect((await admin.get('/api/auth/me')).body.idleMinutes).toBe(10);
  });

  it('refuses out-of-range and unknown values with nothing saved', async () => {
    const before = await t.db.getRepository(ClinicSettings).findOneBy({ id: 'clinic' });
    for (const body of [{ idleMinutes: 600 }, { reviewReminderDays: 60 }, { timeZone: 'Mars/Olympus' }, { watermarkText: 'a\u0007b' }, { colour: 'red' }]) {
      const res = await admin.patch('/api/settings').send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
    expect(await t.db.getRepository(ClinicSettings).findOneBy({ id: 'clinic' })).toEqual(before);
  });

  it('lets only admins change settings', async () => {
    const { client } = await signedIn(t, 'practitioner');
    expect((await client.patch('/api/settings').send({ idleMinutes: 5 })).status).toBe(403);
  });
});
