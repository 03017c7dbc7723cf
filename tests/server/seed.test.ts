import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../server/db/data-source.js';
import { DEMO_USERS, seedDemo } from '../../server/db/seed.js';

let db: DataSource;
beforeAll(async () => {
  db = await openDatabase(':memory:');
});
afterAll(() => db.destroy());

describe('demo clinic', () => {
  it('seeds each role, a dozen patients with a year of visits, and only once', async () => {
    expect(await seedDemo(db)).toBe(true);
    const roles = await db.query('SELECT role, count(*) AS n FROM "user" GROUP BY role');
    expect(Object.fromEntries(roles.map((r: { role: string; n: number }) => [r.role, r.n]))).toEqual({ admin: 1, practitioner: 2, coordinator: 1 });
    const [{ n: patients }] = await db.query('SELECT count(*) AS n FROM patient');
    expect(patients).toBe(12);
    // Every visit is with a practitioner, never with the admin or the front desk.
    const byRole = await db.query('SELECT u.role AS role, count(*) AS n FROM visit v JOIN "user" u ON u.id = v.practitionerId GROUP BY u.role');
    expect(byRole.map((r: { role: string }) => r.role)).toEqual(['practitioner']);
    const [{ oldest }] = await db.query('SELECT min(startsAt) AS oldest FROM visit');
    expect(Date.now() - Date.parse(oldest)).toBeGreaterThan(300 * 86_400_000);
    const withoutVisits = await db.query('SELECT count(*) AS n FROM patient p WHERE NOT EXISTS (SELECT 1 FROM visit v WHERE v.patientId = p.id)');
    expect(withoutVisits[0].n).toBe(0);
    expect(await seedDemo(db)).toBe(false);
    expect(DEMO_USERS.every((u) => u.email.endsWith('.example'))).toBe(true);
  });
});
