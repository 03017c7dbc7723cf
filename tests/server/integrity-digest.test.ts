import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { ChainDigest, ChainHead } from '../../server/entities/record-chain.js';
import { CHAINS, linkHash, rowHashOf } from '../../server/features/integrity/chain.js';
import { createDigestScheduler } from '../../server/features/integrity/digest.js';
import { addDays, dayIn, zonedHourToUtc } from '../../server/lib/time.js';
import { createPatient, createUser, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { answersFor, demoForms, handOver, signaturePng } from '../helpers/consents.js';

let t: TestApp;
let admin: Client;
let consentId: string;
const today = dayIn('Europe/London');
const at = (day: string, hour: number) => new Date(zonedHourToUtc(day, hour, 'Europe/London'));
const scheduler = () => createDigestScheduler({ db: t.db, config: t.config, logger: t.deps.logger, mailer: t.deps.mailer });

beforeAll(async () => {
  t = await makeTestApp();
  admin = (await signedIn(t, 'admin')).client;
  await createUser(t.db, 'admin', { email: 'owner@clinic.example' });
  await createUser(t.db, 'admin', { email: 'former@clinic.example', active: false });
  const forms = await demoForms(t, (await signedIn(t, 'admin')).user.id);
  const patient = await createPatient(t.db);
  const tablet = await handOver((await signedIn(t, 'practitioner')).client, patient.id, [forms.photography.id]);
  expect((await tablet.post(`/api/handover/forms/${forms.photography.id}/shown`).send({})).status).toBe(200);
  const res = await tablet.post(`/api/handover/forms/${forms.photography.id}/sign`).send({ answers: answersFor(forms.photography), signerName: 'Nadia Testworth', signature: await signaturePng() });
  expect(res.status).toBe(201);
  consentId = res.body.consentId;
}, 120_000);
afterAll(() => t.close());

describe('the daily digest of chain heads', () => {
  it('goes to every active admin once a day from the digest hour, however many instances run it', async () => {
    expect(await scheduler().runOnce(at(today, 6))).toBe(0);
    const admins = 3; // the signed-in admins plus the owner; the inactive one gets nothing
    const [a, b] = await Promise.all([scheduler().runOnce(at(today, 8)), scheduler().runOnce(at(today, 8))]);
    expect(a + b).toBe(admins);
    expect(await scheduler().runOnce(at(today, 9))).toBe(0);
    const mails = await t.db.getRepository(MailLog).findBy({ relatedType: 'chain-digest', relatedId: today });
    expect(mails).toHaveLength(admins);
    expect(mails.map((m) => m.to)).toContain('owner@clinic.example');
    expect(mails.map((m) => m.to)).not.toContain('former@clinic.example');

    // The mail states each head as stored, and today's walk.
    await t.deps.mailer.runOnce();
    await t.deps.mailer.idle();
    const sent = (await t.mails()).find((m) => m.subject === `Record chain heads for ${today}, Linden Row Aesthetics`)!;
    expect(sent).toBeDefined();
    const digest = await t.db.getRepository(ChainDigest).findOneByOrFail({ day: today });
    for (const h of await t.db.getRepository(ChainHead).find()) {
      expect(sent.text).toContain(`${CHAINS[h.chain as keyof typeof CHAINS].label}: row #${h.seq}, ${h.hash}`);
      expect(JSON.parse(digest.heads)[h.chain]).toMatchObject({ seq: Number(h.seq), hash: h.hash });
    }
    expect(sent.text).toContain('all 3 chains verify');
  });

  it('catches a later rewrite that also rewrote the chain head: the e-mailed head no longer matches (FACTS 26)', async () => {
    const ok = await admin.post('/api/integrity/check').send({});
    expect(ok.body.ok).toBe(true);
    expect(ok.body.chains.find((c: { chain: string }) => c.chain === 'consent').digestsChecked).toBe(1);

    // The last consent record, its stored hash and the head, all rewritten consistently, triggers out of the way.
    const r = await t.db.getRepository(ConsentRecord).findOneByOrFail({ id: consentId });
    const head = await t.db.getRepository(ChainHead).findOneByOrFail({ chain: 'consent' });
    expect(Number(head.seq)).toBe(r.chainSeq);
    const trigger = (await t.db.query(`SELECT sql FROM sqlite_master WHERE type = 'trigger' AND name = 'consent_record_withdraw_once'`))[0].sql as string;
    await t.db.query(`DROP TRIGGER "consent_record_withdraw_once"`);
    const forgedHash = rowHashOf(CHAINS.consent, r.chainSeq, { ...r, signerName: 'Someone Else' });
    await t.db.query(`UPDATE "consent_record" SET "signerName" = 'Someone Else', "rowHash" = ? WHERE "id" = ?`, [forgedHash, r.id]);
    await t.db.query(`UPDATE "chain_head" SET "hash" = ? WHERE "chain" = 'consent'`, [linkHash(r.prevHash, forgedHash)]);
    await t.db.query(trigger);

    const broken = await admin.post('/api/integrity/check').send({});
    expect(broken.body.ok).toBe(false);
    const consent = broken.body.chains.find((c: { chain: string }) => c.chain === 'consent');
    expect(consent.problem).toMatchObject({ table: 'consent_record', seq: r.chainSeq, rowId: r.id });
    expect(consent.problem.message).toContain(`differs from the head e-mailed to the admins on ${today}`);
    expect(await t.db.getRepository(AuditEvent).countBy({ action: 'integrity.check' })).toBe(2);

    // The next day's digest warns the admins.
    const tomorrow = addDays(today, 1);
    expect(await scheduler().runOnce(at(tomorrow, 8))).toBe(3);
    const warning = await t.db.getRepository(MailLog).findOneByOrFail({ relatedType: 'chain-digest', relatedId: tomorrow });
    expect(warning.subject).toMatch(/^Broken record chain: /);
    expect(warning.text).toContain(`(id ${r.id})`);
  });

  it('shows admins the heads, the digests sent and the signing certificate', async () => {
    const res = await admin.get('/api/integrity');
    expect(res.status).toBe(200);
    expect(res.body.chains.map((c: { chain: string }) => c.chain)).toEqual(['consent', 'evidence', 'access']);
    expect(res.body.chains[0]).toMatchObject({ label: 'Consent records', table: 'consent_record', seq: 1, hash: expect.stringMatching(/^[0-9a-f]{64}$/) });
    expect(res.body.digests.map((d: { day: string }) => d.day)).toEqual([addDays(today, 1), today]);
    expect(res.body.certificate).toMatchObject({ commonName: 'Linden Row Aesthetics', source: 'generated', fingerprint: expect.stringMatching(/^[0-9a-f]{64}$/) });
  });
});
