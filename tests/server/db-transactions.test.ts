import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../server/db/data-source.js';
import { AuditEvent } from '../../server/entities/audit-event.js';
import { newId, nowIso } from '../../server/lib/time.js';

let db: DataSource;
beforeAll(async () => {
  db = await openDatabase(':memory:');
});
afterAll(() => db.destroy());

const event = (action: string) => ({ id: newId(), at: nowIso(), actorId: null, actorRole: 'anonymous', action, patientId: null, targetType: null, targetId: null, ip: null, userAgent: null, details: '{}' });

describe('transactions on the one SQLite connection', () => {
  it('run one after another when begun together, each committing or rolling back on its own', async () => {
    const results = await Promise.allSettled(
      Array.from({ length: 8 }, (_, i) =>
        db.transaction(async (tx) => {
          await tx.getRepository(AuditEvent).insert(event(`tx.${i}`));
          // Waiting on I/O inside a transaction must not let another one begin on the same connection.
          await new Promise((r) => setTimeout(r, 5));
          if (i % 4 === 3) throw new Error('roll back');
        }),
      ),
    );
    expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(6);
    expect(results.filter((r) => r.status === 'rejected').map((r) => (r as PromiseRejectedResult).reason.message)).toEqual(['roll back', 'roll back']);
    const saved = (await db.getRepository(AuditEvent).find()).map((e) => e.action).sort();
    expect(saved).toEqual(['tx.0', 'tx.1', 'tx.2', 'tx.4', 'tx.5', 'tx.6']);
  });
});
