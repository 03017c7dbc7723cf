import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { THROTTLE } from '../../server/auth/login.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { loadConfig } from '../../server/config.js';
import { Client, createUser, makeTestApp, signedIn, TEST_PASSWORD, type TestApp } from '../helpers/app.js';

let t: TestApp;
let admin: Client;
let adminEmail: string;

beforeAll(async () => {
  // Behind the clinic's reverse proxy: the client address comes from X-Forwarded-For.
  t = await makeTestApp({ TRUST_PROXY: '1' });
  ({ client: admin, user: { email: adminEmail } } = await signedIn(t, 'admin'));
});
afterAll(() => t.close());

/** A sign-in attempt from a given client address. */
let anonymous: Client | undefined;
async function attempt(email: string, password: string, ip: string) {
  const c = anonymous ?? (anonymous = new Client(t.app));
  await c.refreshCsrf();
  return c.agent.post('/api/auth/login').set('X-CSRF-Token', c.csrf).set('X-Forwarded-For', ip).send({ email, password });
}

/** Moves every recorded failure of an account back in time, as if the delay had been waited out. */
const age = (email: string, seconds: number) =>
  t.db.query(`UPDATE "login_failure" SET "at" = strftime('%Y-%m-%dT%H:%M:%fZ', "at", ?) WHERE "email" = ?`, [`-${seconds} seconds`, email]);

describe('sign-in throttling (OWASP ASVS 4.0 2.2.1: slow attackers, do not lock out the real user)', () => {
  it('does not lock the clinic out after many failures from one address (a clinic behind one NAT address)', { timeout: 300_000 }, async () => {
    const user = await createUser(t.db, 'admin');
    for (let i = 0; i < 50; i++) expect((await attempt(`guess-${i}@clinic.example`, 'wrong-password', '203.0.113.7')).status).toBe(401);
    expect((await attempt(user.email, TEST_PASSWORD, '203.0.113.7')).status).toBe(200);
    anonymous = undefined;
  });

  it('delays further attempts on an account progressively, right password included, without locking it', { timeout: 120_000 }, async () => {
    const user = await createUser(t.db, 'practitioner');
    for (let i = 0; i < THROTTLE.freeFailures; i++) expect((await attempt(user.email, 'wrong-password', '198.51.100.1')).status).toBe(401);
    const delayed = await attempt(user.email, TEST_PASSWORD, '198.51.100.1');
    expect(delayed.status).toBe(429);
    expect(delayed.body.error.code).toBe('SIGN_IN_DELAY');
    expect(Number(delayed.headers['retry-after'])).toBeGreaterThanOrEqual(1);
    await age(user.email, 2);
    expect((await attempt(user.email, 'wrong-password', '198.51.100.1')).status).toBe(401);
    // The next delay is longer (2^n seconds, at most the cap).
    const longer = await attempt(user.email, TEST_PASSWORD, '198.51.100.1');
    expect(longer.status).toBe(429);
    expect(Number(longer.headers['retry-after'])).toBeGreaterThan(Number(delayed.headers['retry-after']));
    await age(user.email, THROTTLE.maxDelaySeconds);
    expect((await attempt(user.email, TEST_PASSWORD, '198.51.100.1')).status).toBe(200);
  });

  it('stops one address guessing one account, while the real user elsewhere still signs in; admins are alerted and can lift it', { timeout: 180_000 }, async () => {
    const target = await createUser(t.db, 'admin');
    for (let i = 0; i < THROTTLE.perAccountAndAddress; i++) {
      await age(target.email, THROTTLE.maxDelaySeconds);
      expect((await attempt(target.email, `guess-${i}`, '192.0.2.66')).status).toBe(401);
    }
    await age(target.email, THROTTLE.maxDelaySeconds);
    const blocked = await attempt(target.email, TEST_PASSWORD, '192.0.2.66');
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('SIGN_IN_LIMIT');
    expect((await attempt(target.email, TEST_PASSWORD, '198.51.100.20')).status).toBe(200);
    const alerts = await t.db.getRepository(MailLog).findBy({ relatedType: 'sign-in-alert', relatedId: target.id });
    // One mail to each active admin, naming the account.
    const to = alerts.map((a) => a.to);
    expect(to).toContain(adminEmail);
    expect(new Set(to).size).toBe(to.length);
    for (const a of alerts) expect(a.text).toContain(target.email);
    expect((await admin.post(`/api/users/${target.id}/unlock`).send({})).status).toBe(204);
    expect((await attempt(target.email, TEST_PASSWORD, '192.0.2.66')).status).toBe(200);
  });
});

describe('TRUST_PROXY', () => {
  it('is its own setting: secure cookies alone do not trust X-Forwarded-For', () => {
    expect(loadConfig({ COOKIE_SECURE: '1' }).trustProxy).toBe(false);
    expect(loadConfig({ TRUST_PROXY: '1' }).trustProxy).toBe(1);
    expect(loadConfig({ TRUST_PROXY: 'loopback, 10.0.0.0/8' }).trustProxy).toBe('loopback, 10.0.0.0/8');
    expect(loadConfig({}).trustProxy).toBe(false);
  });
});
