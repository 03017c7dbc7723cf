import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Patient } from '../../server/entities/patient.js';
import { Client, createPatient, makeTestApp, signedIn, type TestApp } from '../helpers/app.js';

let t: TestApp;
let desk: Client;

beforeAll(async () => {
  t = await makeTestApp();
  desk = (await signedIn(t, 'coordinator')).client;
});
afterAll(() => t.close());

const find = async (q: string) => {
  const res = await desk.get('/api/patients').query({ q, pageSize: 100 });
  expect(res.status, q).toBe(200);
  return res.body as { items: { id: string; lastName: string }[]; total: number };
};
const ids = async (q: string) => (await find(q)).items.map((p) => p.id);

describe('patient search through the indexes', () => {
  it('finds any 3+ characters of a name, ignoring case and accents, and words in any order', async () => {
    const dalia = await createPatient(t.db, { firstName: 'Dalia', lastName: 'Kovařík' });
    const other = await createPatient(t.db, { firstName: 'Dalibor', lastName: 'Strand' });
    for (const q of ['ovar', 'KOVARIK', 'kovařík', 'Dalia Kovarik', 'kovarik dalia', 'lia kov']) expect(await ids(q), q).toEqual([dalia.id]);
    expect(await ids('dali')).toEqual(expect.arrayContaining([dalia.id, other.id]));
    // A short word narrows what the long ones found.
    expect(await ids('dali st')).toEqual([other.id]);
  });

  it('matches short searches at the start of a first or last name only', async () => {
    const a = await createPatient(t.db, { firstName: 'Ottilie', lastName: 'Qwynne' });
    const b = await createPatient(t.db, { firstName: 'Qwendolyn', lastName: 'Marsh' });
    const c = await createPatient(t.db, { firstName: 'Aqwa', lastName: 'Bright' });
    const found = await ids('qw');
    expect(found).toEqual(expect.arrayContaining([a.id, b.id]));
    expect(found).not.toContain(c.id);
    expect(await ids('Ot Qw')).toEqual([a.id]);
  });

  it('finds clinic codes whole or in part, and treats search syntax as text', async () => {
    const p = await createPatient(t.db, { code: 'ZX-7731', lastName: 'Coder' });
    expect(await ids('ZX-7731')).toEqual([p.id]);
    expect(await ids('7731')).toEqual([p.id]);
    for (const q of ['"', 'a"b OR c*', 'NEAR(x y)', '%%%', '_']) expect((await find(q)).items, q).toEqual([]);
  });

  it('follows renames and forgets deleted patients', async () => {
    const p = await createPatient(t.db, { firstName: 'Wilhelmina', lastName: 'Oldname' });
    expect(await ids('oldname')).toEqual([p.id]);
    await desk.patch(`/api/patients/${p.id}`).send({ lastName: 'Newbury' }).expect(200);
    expect(await ids('oldname')).toEqual([]);
    expect(await ids('newbury')).toEqual([p.id]);
    await t.db.getRepository(Patient).delete({ id: p.id });
    expect(await ids('newbury')).toEqual([]);
    const left = (await t.db.query(`SELECT count(*) AS n FROM "patient_search_key" WHERE "patientId" = ?`, [p.id])) as { n: number }[];
    expect(left[0].n).toBe(0);
  });

  it('uses the indexes, not a scan of the patients, for names, dates of birth and codes', async () => {
    const plan = async (q: string) => {
      const [sql, params] = t.db
        .getRepository(Patient)
        .createQueryBuilder('p')
        .where(q.includes('MATCH') ? `p.id IN (SELECT k."patientId" FROM "patient_search_key" k WHERE k."id" IN (SELECT "rowid" FROM "patient_search" WHERE "patient_search" MATCH :m))` : q, { m: '"abc"', d: '1990-01-01', f: 'ab%' })
        .getQueryAndParameters();
      const rows = (await t.db.query(`EXPLAIN QUERY PLAN ${sql}`, params)) as { detail: string }[];
      return rows.map((r) => r.detail).join(' | ');
    };
    expect(await plan('MATCH')).toMatch(/VIRTUAL TABLE INDEX/);
    expect(await plan('MATCH')).not.toMatch(/SCAN p\b/);
    expect(await plan('p.dateOfBirth = :d')).toMatch(/USING INDEX IDX_patient_dob/);
    expect(await plan(`(p.lastName LIKE :f ESCAPE '\\' OR p.firstName LIKE :f ESCAPE '\\')`)).toMatch(/IDX_patient_last_nocase.*IDX_patient_first_nocase/);
  });
});

describe('next patient code', () => {
  it('continues after the highest code however it was written, without reusing a rolled-back number', async () => {
    await createPatient(t.db, { code: 'LR-0420' });
    const a = await desk.post('/api/patients').send({ firstName: 'Ada', lastName: 'Counter', dateOfBirth: '1990-01-01' });
    expect(a.body.code).toBe('LR-0421');
    // A creation that fails after taking a number gives it back with its transaction.
    await t.db
      .transaction(async (tx) => {
        await tx.query(`UPDATE "patient_code_counter" SET "last" = "last" + 1 WHERE "prefix" = 'LR'`);
        throw new Error('rolled back');
      })
      .catch(() => undefined);
    const b = await desk.post('/api/patients').send({ firstName: 'Bea', lastName: 'Counter', dateOfBirth: '1990-01-01' });
    expect(b.body.code).toBe('LR-0422');
  });
});
