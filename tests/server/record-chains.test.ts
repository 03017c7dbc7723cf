import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import path from 'node:path';
import { promisify } from 'node:util';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/data-source.js';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { ChainHead, ChainTombstone } from '../../server/entities/record-chain.js';
import type { Patient } from '../../server/entities/patient.js';
import { CHAINS, GENESIS, linkHash, rowHashOf } from '../../server/features/integrity/chain.js';
import { canonicalJson } from '../../server/features/consents/hash.js';
import { walkChains } from '../../server/features/integrity/walk.js';
import { audit } from '../../server/lib/audit.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, demoForms, handOver, signaturePng } from '../helpers/consents.js';

const run = promisify(execFile);

let t: TestApp;
let admin: Client;
let kept: Patient;
const consentIds: string[] = [];

/** `npm run verify:records` against this test's database file, as an operator would run it. */
async function verifyRecords(): Promise<{ code: number; out: string }> {
  try {
    const { stdout } = await run('npm', ['run', '--silent', 'verify:records'], { env: { ...process.env, TWINFRAME_DATA_DIR: t.dataDir }, cwd: process.cwd() });
    return { code: 0, out: stdout };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, out: e.stdout + e.stderr };
  }
}

/** The SQLite file opened directly, around the app, as someone holding a copy of it could. */
function sqliteFile() {
  return new Database(path.join(t.dataDir, 'twinframe.sqlite'));
}

async function signAll(patient: Patient, kinds: ('treatment' | 'photography' | 'showcase')[]) {
  const forms = await demoForms(t, (await signedIn(t, 'admin')).user.id);
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, patient.id, kinds.map((k) => forms[k].id));
  const signature = await signaturePng();
  for (const k of kinds) {
    const f = forms[k];
    expect((await tablet.post(`/api/handover/forms/${f.id}/shown`).send({})).status).toBe(200);
    const res = await tablet.post(`/api/handover/forms/${f.id}/sign`).send({
      answers: answersFor(f),
      signerName: `${patient.firstName} ${patient.lastName}`,
      signature,
      ...(k === 'showcase' ? { channels: ['clinic-website'], crop: 'lips-only' } : {}),
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    consentIds.push(res.body.consentId);
  }
}

beforeAll(async () => {
  t = await makeTestApp({}, {}, { sqliteFile: true });
  admin = (await signedIn(t, 'admin')).client;
  kept = await createPatient(t.db, { firstName: 'Imogen', lastName: 'Chainley' });
  await signAll(kept, ['treatment', 'photography', 'showcase']);
  const withdrawn = await admin.post(`/api/consents/${consentIds[1]}/withdraw`).send({ reason: 'Changed her mind' });
  expect(withdrawn.status).toBe(200);
  // A second patient signs and is then erased (retention 0 years so erasure is allowed).
  const gone = await createPatient(t.db, { firstName: 'Esme', lastName: 'Erasewell' });
  await signAll(gone, ['photography']);
  expect((await admin.patch('/api/settings').send({ retentionYears: 0 })).status).toBe(200);
  const erased = await admin.delete(`/api/patients/${gone.id}`).send({ confirmName: 'Esme Erasewell', reason: 'Erasure request' });
  expect(erased.status, JSON.stringify(erased.body)).toBe(200);
  // Reads that land in the access log.
  for (const id of consentIds.slice(0, 3)) expect((await admin.get(`/api/consents/${id}`)).status).toBe(200);
}, 240_000);
afterAll(() => t.close());

describe('the chain hashes', () => {
  it('are RFC 6962-style leaf and node hashes over canonical JSON (SHA-256, FIPS 180-4)', () => {
    const row = { id: 'a', at: '2026-01-01T00:00:00.000Z', actorId: null, actorRole: 'admin', action: 'x', details: '{}' };
    const content = canonicalJson({ chain: 'access', seq: 1, row: { action: 'x', actorRole: 'admin', at: '2026-01-01T00:00:00.000Z', details: '{}', id: 'a' } });
    const leaf = createHash('sha256').update(Buffer.concat([Buffer.from([0]), Buffer.from(content)])).digest('hex');
    expect(rowHashOf(CHAINS.access, 1, row)).toBe(leaf);
    const node = createHash('sha256').update(Buffer.concat([Buffer.from([1]), Buffer.alloc(32), Buffer.from(leaf, 'hex')])).digest('hex');
    expect(linkHash(GENESIS, leaf)).toBe(node);
    // The same content read from SQLite (0/1) or PostgreSQL (true/false) hashes the same.
    const r = { id: 'c', nameMatchesPatient: 1, templateVersion: '2' };
    expect(rowHashOf(CHAINS.consent, 5, r)).toBe(rowHashOf(CHAINS.consent, 5, { id: 'c', nameMatchesPatient: true, templateVersion: 2 }));
  });

  it('cover every column of a chained table, or leave it out on purpose', () => {
    for (const chain of Object.values(CHAINS)) {
      const columns = t.db.getMetadata(chain.entity).columns.map((c) => c.propertyName);
      const decided = [...Object.keys(chain.columns), ...chain.unhashed];
      expect(columns.filter((c) => !decided.includes(c)), `${chain.table}: add new columns to CHAINS in server/features/integrity/chain.ts`).toEqual([]);
      expect(decided.filter((c) => !columns.includes(c))).toEqual([]);
    }
  });
});

// Each run starts npm and tsx (a few seconds on a loaded machine).
describe('npm run verify:records', { timeout: 120_000 }, () => {
  it('finds all three chains intact after signing, a withdrawal, reads and an erasure (tombstones)', async () => {
    const { code, out } = await verifyRecords();
    expect(out).toMatch(/OK +Consent records: 4 rows, 1 erased/);
    expect(out).toMatch(/OK +Consent evidence and withdrawals: \d+ rows, \d+ erased/);
    expect(out).toMatch(/OK +Access log: \d+ rows/);
    expect(code).toBe(0);
    expect(await t.db.getRepository(ChainTombstone).countBy({ chain: 'consent' })).toBe(1);
  });

  it('names a consent record rewritten with its stored hash after dropping and recreating the trigger (RFC 6962 style chain)', async () => {
    const target = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: consentIds[1] });
    const f = sqliteFile();
    const original = f.prepare(`SELECT * FROM "consent_record" WHERE "id" = ?`).get(target.id) as Record<string, unknown>;
    const trigger = (f.prepare(`SELECT sql FROM sqlite_master WHERE type = 'trigger' AND name = 'consent_record_withdraw_once'`).get() as { sql: string }).sql;
    // What someone with the file can do: drop the immutability trigger, rewrite the record and, knowing the
    // algorithm, its stored hash, then put the trigger back.
    const forged = { ...original, signerName: 'Someone Else', pdfSha256: 'f'.repeat(64) };
    f.exec(`DROP TRIGGER "consent_record_withdraw_once"`);
    f.prepare(`UPDATE "consent_record" SET "signerName" = ?, "pdfSha256" = ?, "rowHash" = ? WHERE "id" = ?`).run(
      forged.signerName,
      forged.pdfSha256,
      rowHashOf(CHAINS.consent, Number(original.chainSeq), forged),
      target.id,
    );
    f.exec(trigger);
    expect(() => f.prepare(`UPDATE "consent_record" SET "signerName" = 'x' WHERE "id" = ?`).run(target.id)).toThrow(/immutable/);
    f.close();

    const { code, out } = await verifyRecords();
    expect(code).toBe(1);
    expect(out).toContain('BROKEN Consent records');
    expect(out).toContain(`first broken row: Row #${target.chainSeq} of consent_record (id ${target.id}) was rewritten`);
    // The other chains are not affected.
    expect(out).toMatch(/OK +Access log/);

    const g = sqliteFile();
    g.exec(`DROP TRIGGER "consent_record_withdraw_once"`);
    g.prepare(`UPDATE "consent_record" SET "signerName" = ?, "pdfSha256" = ?, "rowHash" = ? WHERE "id" = ?`).run(original.signerName, original.pdfSha256, original.rowHash, target.id);
    g.exec(trigger);
    g.close();
    expect((await verifyRecords()).code).toBe(0);
  });

  it('names a row edited without its hash, and a row deleted outside an erasure', async () => {
    const f = sqliteFile();
    const ev = f.prepare(`SELECT * FROM "consent_evidence" WHERE "event" = 'form.signed' ORDER BY "chainSeq" LIMIT 1`).get() as Record<string, unknown>;
    f.exec(`DROP TRIGGER "consent_evidence_no_update"`);
    f.prepare(`UPDATE "consent_evidence" SET "ip" = '203.0.113.9' WHERE "id" = ?`).run(ev.id);
    let r = await verifyRecords();
    expect(r.code).toBe(1);
    expect(r.out).toContain(`Row #${ev.chainSeq} of consent_evidence (id ${ev.id}) was changed: its content no longer matches its stored hash.`);
    f.prepare(`UPDATE "consent_evidence" SET "ip" = ? WHERE "id" = ?`).run(ev.ip, ev.id);
    f.exec(`CREATE TRIGGER "consent_evidence_no_update" BEFORE UPDATE ON "consent_evidence" BEGIN SELECT RAISE(ABORT, 'consent_evidence is append-only'); END`);

    const log = f.prepare(`SELECT * FROM "audit_event" WHERE "action" = 'consent.view' ORDER BY "chainSeq" LIMIT 1`).get() as Record<string, unknown>;
    f.exec(`DROP TRIGGER "audit_event_no_delete"`);
    f.prepare(`DELETE FROM "audit_event" WHERE "id" = ?`).run(log.id);
    r = await verifyRecords();
    expect(r.code).toBe(1);
    expect(r.out).toContain(`Row #${log.chainSeq} of audit_event is missing (deleted outside an erasure)`);
    const cols = Object.keys(log);
    f.prepare(`INSERT INTO "audit_event" (${cols.map((c) => `"${c}"`).join(', ')}) VALUES (${cols.map(() => '?').join(', ')})`).run(...cols.map((c) => log[c] as string | number | null));
    f.exec(`CREATE TRIGGER "audit_event_no_delete" BEFORE DELETE ON "audit_event" BEGIN SELECT RAISE(ABORT, 'audit_event is append-only'); END`);
    f.close();
    expect((await verifyRecords()).code).toBe(0);
  });

  it('names the withdrawal when a record\'s withdrawal fields are rewritten', async () => {
    const f = sqliteFile();
    const trigger = (f.prepare(`SELECT sql FROM sqlite_master WHERE type = 'trigger' AND name = 'consent_record_withdraw_once'`).get() as { sql: string }).sql;
    const before = f.prepare(`SELECT "withdrawalDate" FROM "consent_record" WHERE "id" = ?`).get(consentIds[1]) as { withdrawalDate: string };
    f.exec(`DROP TRIGGER "consent_record_withdraw_once"`);
    f.prepare(`UPDATE "consent_record" SET "withdrawalDate" = '2020-01-01' WHERE "id" = ?`).run(consentIds[1]);
    const r = await verifyRecords();
    expect(r.code).toBe(1);
    expect(r.out).toContain(`(id ${consentIds[1]}): its withdrawal fields do not match its chained withdrawal evidence`);
    f.prepare(`UPDATE "consent_record" SET "withdrawalDate" = ? WHERE "id" = ?`).run(before.withdrawalDate, consentIds[1]);
    f.exec(trigger);
    f.close();
  });
});

describe('appends', () => {
  it('from many requests at once stay one line, and a second instance continues from the stored head', async () => {
    const before = await t.db.getRepository(ChainHead).findOneByOrFail({ chain: 'access' });
    // Thirty writers begun in the same tick, as thirty requests would.
    await Promise.all(Array.from({ length: 30 }, (_, i) => audit(t.db, null, { action: 'test.concurrent', targetId: String(i), actorRole: 'anonymous' })));
    // A second instance on the same database: the head lives in the database, not in either process.
    const other = await openDatabase(path.join(t.dataDir, 'twinframe.sqlite'));
    try {
      for (let i = 30; i < 36; i++) await audit(i % 2 ? t.db : other, null, { action: 'test.concurrent', targetId: String(i), actorRole: 'anonymous' });
    } finally {
      await other.destroy();
    }
    const after = await t.db.getRepository(ChainHead).findOneByOrFail({ chain: 'access' });
    expect(Number(after.seq)).toBe(Number(before.seq) + 36);
    const seqs = (await t.db.getRepository(AuditEvent).findBy({ action: 'test.concurrent' })).map((e) => e.chainSeq).sort((a, b) => a - b);
    expect(seqs).toEqual(Array.from({ length: 36 }, (_, i) => Number(before.seq) + 1 + i));
    const reports = await walkChains(t.db);
    expect(reports.map((r) => [r.chain, r.ok, r.problem?.message ?? null])).toEqual([
      ['consent', true, null],
      ['evidence', true, null],
      ['access', true, null],
    ]);
  });

  it('are refused outside a transaction, so the head cannot be raced', async () => {
    await expect(t.db.getRepository(AuditEvent).insert({ id: crypto.randomUUID(), at: new Date().toISOString(), actorId: null, actorRole: 'anonymous', action: 'x', patientId: null, targetType: null, targetId: null, ip: null, userAgent: null, details: '{}' })).rejects.toThrow(/inside a transaction/);
  });
});
