import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { loadConfig } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { seedDemo } from '../../server/db/seed.js';
import { Treatment } from '../../server/entities/treatment.js';
import { createReminderScheduler } from '../../server/features/reminders/scheduler.js';
import { treatmentTotals } from '../../server/features/treatments/totals.js';
import { createLogger } from '../../server/logger.js';

let db: DataSource;
beforeAll(async () => {
  db = await openDatabase(':memory:');
  await seedDemo(db);
});
afterAll(() => db.destroy());

describe("the demo clinic's treatment records", () => {
  it('record every past treatment visit with plausible amounts and traceable lots', async () => {
    const [{ n: visits }] = await db.query(`SELECT count(*) AS n FROM visit WHERE kind = 'treatment' AND status = 'completed'`);
    const treatments = await db.getRepository(Treatment).find({ relations: { lines: { doses: true } } });
    expect(treatments.length).toBe(visits);
    for (const t of treatments) {
      const totals = treatmentTotals((t.lines ?? []).map((l) => ({ kind: l.kind, doses: l.doses ?? [] })));
      // A session commonly uses about 0.5–1 mL, up to about 1.5 mL (FACTS 17, common practice).
      expect(totals.fillerMl).toBeGreaterThanOrEqual(0.5);
      expect(totals.fillerMl).toBeLessThanOrEqual(1.5);
      // Neuromodulator to the DAO: about 2–5 U per side (FACTS 20, from memory).
      if (totals.toxinU) expect(totals.toxinUBySide.right).toBeGreaterThanOrEqual(2);
      for (const l of t.lines ?? []) {
        expect(l.lotNumber).toMatch(/^LR\d{6}$/);
        expect(l.expiryDate! > t.treatedOn).toBe(true);
      }
    }
  });

  it('leave no past-due reminder for the scheduler to send on first start', async () => {
    const [{ sent }] = await db.query(`SELECT count(*) AS sent FROM reminder WHERE state = 'sent'`);
    const [{ scheduled }] = await db.query(`SELECT count(*) AS scheduled FROM reminder WHERE state = 'scheduled'`);
    expect(sent).toBeGreaterThan(0);
    expect(scheduled).toBeGreaterThan(0);
    const [{ unlinked }] = await db.query(`SELECT count(*) AS unlinked FROM reminder r LEFT JOIN mail_log m ON m.id = r.mailId WHERE r.state = 'sent' AND (m.id IS NULL OR m.relatedId <> r.id)`);
    expect(unlinked).toBe(0);
    const queued = await createReminderScheduler({ db, config: loadConfig({}), logger: createLogger('silent'), mailer: { kick() {} } }).runOnce();
    expect(queued).toBe(0);
  });
});
