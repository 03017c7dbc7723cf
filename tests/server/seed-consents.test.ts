import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../server/db/seed.js';
import { seedDemoConsents } from '../../server/db/seed-consents.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { Patient } from '../../server/entities/patient.js';
import { makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
  await seedDemo(t.db);
}, 120_000);
afterAll(() => t.close());

describe('demo signed forms', () => {
  it('are signed through the real hand-over code, verify, and leave later patients unsigned', async () => {
    const n = await seedDemoConsents(t.deps);
    expect(n).toBeGreaterThan(10);
    const records = await t.db.getRepository(ConsentRecord).find();
    expect(records).toHaveLength(n);
    const { client } = await signedIn(t, 'admin');
    for (const r of records.slice(0, 3)) {
      const res = await client.get(`/api/consents/${r.id}/verify`);
      expect(res.status).toBe(200);
      expect(res.body.status).toBe('valid');
    }
    const first = await t.db.getRepository(Patient).findOneByOrFail({ code: 'LR-0001' });
    const showcase = records.find((r) => r.patientId === first.id && r.kind === 'showcase');
    expect(showcase && JSON.parse(showcase.channels)).toEqual(['clinic-website', 'social-media']);
    const last = await t.db.getRepository(Patient).findOneByOrFail({ code: 'LR-0012' });
    expect(records.some((r) => r.patientId === last.id)).toBe(false);
    expect(await seedDemoConsents(t.deps)).toBe(0);
    // Sixteen forms rendered and signed (RSA-3072) one after another: slow on a loaded machine.
  }, 180_000);
});
