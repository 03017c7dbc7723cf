import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/entities/session.js';
import { Client, createUser, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
let admin: Client;

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
});
afterAll(() => t.close());

/** A user signed in on two devices. */
async function onTwoDevices(role: 'practitioner' | 'coordinator' = 'practitioner') {
  const user = await createUser(t.db, role);
  const devices = [new Client(t.app), new Client(t.app)];
  for (const d of devices) expect((await d.login(user.email)).status).toBe(200);
  return { user, devices };
}

async function expectEnded(c: Client) {
  const res = await c.get('/api/auth/me');
  expect(res.status).toBe(401);
  expect(res.body.error.code).toBe('SESSION_ENDED');
}

// OWASP ASVS 4.0 3.3.2 (absolute session lifetime) and 3.3.3 / 2.5 (ending sessions on credential change).
describe('sessions that end', () => {
  it('ends every session of a user when an admin resets the password', async () => {
    const { user, devices } = await onTwoDevices();
    expect((await admin.post(`/api/users/${user.id}/password`).send({ password: 'a-brand-new-passphrase' })).status).toBe(204);
    for (const d of devices) await expectEnded(d);
    const again = new Client(t.app);
    expect((await again.login(user.email, 'a-brand-new-passphrase')).status).toBe(200);
    expect((await again.get('/api/auth/me')).status).toBe(200);
  });

  it('ends every session of a user on a role change or deactivation, not on a name change', async () => {
    const a = await onTwoDevices('coordinator');
    expect((await admin.patch(`/api/users/${a.user.id}`).send({ name: 'Renamed Person' })).status).toBe(200);
    expect((await a.devices[0].get('/api/auth/me')).status).toBe(200);
    expect((await admin.patch(`/api/users/${a.user.id}`).send({ role: 'practitioner' })).status).toBe(200);
    for (const d of a.devices) await expectEnded(d);
    const b = await onTwoDevices();
    expect((await admin.patch(`/api/users/${b.user.id}`).send({ active: false })).status).toBe(200);
    for (const d of b.devices) await expectEnded(d);
  });

  it('ends a session at the absolute lifetime (a clinic setting, 12 h by default) however active it is', async () => {
    expect((await admin.get('/api/settings')).body.sessionHours).toBe(12);
    const { user, devices } = await onTwoDevices();
    expect((await devices[0].get('/api/auth/me')).status).toBe(200);
    // Back-date the sign-in of that user's stored sessions by 12 h 1 min.
    const rows = await t.db.getRepository(Session).find();
    for (const row of rows) {
      const data = JSON.parse(row.json);
      if (data.passport?.user !== user.id) continue;
      data.signedInAt = new Date(Date.parse(data.signedInAt) - (12 * 60 + 1) * 60_000).toISOString();
      await t.db.getRepository(Session).update({ id: row.id }, { json: JSON.stringify(data) });
    }
    for (const d of devices) await expectEnded(d);
    expect((await admin.patch('/api/settings').send({ sessionHours: 30 })).status).toBe(400);
  });

  it('signs a user out everywhere, by the user or by an admin', async () => {
    const self = await onTwoDevices();
    expect((await self.devices[0].post('/api/auth/sessions/end').send({})).status).toBe(204);
    // This device's cookie is cleared; the other device hears that its session has ended.
    expect((await self.devices[0].get('/api/auth/me')).status).toBe(401);
    await expectEnded(self.devices[1]);

    const other = await onTwoDevices('coordinator');
    expect((await admin.post(`/api/users/${other.user.id}/sessions/end`).send({})).status).toBe(204);
    for (const d of other.devices) await expectEnded(d);
    expect((await admin.get('/api/auth/me')).status).toBe(200);
  });
});
