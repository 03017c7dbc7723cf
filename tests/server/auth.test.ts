import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { THROTTLE } from '../../server/auth/login.js';
import { Client, createUser, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

describe('sign-in', () => {
  it('signs in, answers /me, and regenerates the session id', async () => {
    const user = await createUser(t.db, 'practitioner');
    const c = new Client(t.app);
    await c.refreshCsrf();
    const before = c.agent.jar.getCookie('tf.sid', { path: '/', domain: '127.0.0.1', secure: false, script: false })?.value;
    const res = await c.post('/api/auth/login').send({ email: user.email.toUpperCase(), password: 'correct-horse-battery' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: user.id, role: 'practitioner' });
    expect(res.body.passwordHash).toBeUndefined();
    const setCookie = String(res.headers['set-cookie']);
    expect(setCookie).toMatch(/HttpOnly/);
    expect(setCookie).toMatch(/SameSite=Strict/);
    const after = setCookie.match(/tf\.sid=([^;]+)/)?.[1];
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
    const me = await c.get('/api/auth/me');
    expect(me.body.email).toBe(user.email);
  });

  it('gives the same error for unknown e-mail and wrong password', async () => {
    const user = await createUser(t.db, 'coordinator');
    const c = new Client(t.app);
    const wrong = await c.login(user.email, 'not-the-password');
    const unknown = await c.login('nobody@clinic.example', 'not-the-password');
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.code).toBe('INVALID_CREDENTIALS');
  });

  it('slows an e-mail after repeated failures, even with the right password', async () => {
    const user = await createUser(t.db, 'admin');
    const c = new Client(t.app);
    for (let i = 0; i < THROTTLE.freeFailures; i++) expect((await c.login(user.email, 'nope-nope')).status).toBe(401);
    const slowed = await c.login(user.email);
    expect(slowed.status).toBe(429);
    expect(slowed.body.error.code).toBe('SIGN_IN_DELAY');
    const events = await t.db.getRepository(AuditEvent).findBy({ action: 'auth.login_failed', actorId: user.id });
    expect(events).toHaveLength(THROTTLE.freeFailures);
  });

  it('refuses a state-changing call without a CSRF token', async () => {
    const { client } = await signedIn(t, 'practitioner');
    const res = await client.agent.post('/api/patients').send({ firstName: 'A', lastName: 'B', dateOfBirth: '1990-01-01' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('CSRF_INVALID');
  });

  it('signs out and then answers 401', async () => {
    const { client } = await signedIn(t, 'practitioner');
    expect((await client.post('/api/auth/logout')).status).toBe(204);
    const me = await client.get('/api/auth/me');
    expect(me.status).toBe(401);
  });

  it('refuses a deactivated user on the next request', async () => {
    const { client, user } = await signedIn(t, 'practitioner');
    await t.db.query('UPDATE "user" SET active = 0 WHERE id = ?', [user.id]);
    expect((await client.get('/api/auth/me')).status).toBe(401);
  });
});

describe('access log', () => {
  it('is append-only at the database level', async () => {
    const [row] = await t.db.getRepository(AuditEvent).find({ take: 1 });
    expect(row).toBeDefined();
    await expect(t.db.query('UPDATE audit_event SET action = ? WHERE id = ?', ['x', row.id])).rejects.toThrow(/append-only/);
    await expect(t.db.query('DELETE FROM audit_event WHERE id = ?', [row.id])).rejects.toThrow(/append-only/);
  });
});
