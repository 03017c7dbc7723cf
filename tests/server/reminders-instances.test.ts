import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../server/db/data-source.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { Reminder } from '../../server/entities/reminder.js';
import { Treatment } from '../../server/entities/treatment.js';
import { Visit } from '../../server/entities/visit.js';
import { newId, nowIso } from '../../server/lib/time.js';
import { createPatient, createUser } from '../helpers/app.js';

const run = promisify(execFile);
let dir: string;
let file: string;
let db: DataSource;

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-reminders-'));
  file = path.join(dir, 'shared.sqlite');
  db = await openDatabase(file);
});
afterAll(async () => {
  await db.destroy();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('several app instances on one database', () => {
  it('queue each due reminder exactly once', async () => {
    const user = await createUser(db, 'practitioner');
    const ids: string[] = [];
    for (let i = 0; i < 5; i++) {
      const patient = await createPatient(db, { email: `instance-${i}@mail.example` });
      const visit = { id: newId(), patientId: patient.id, practitionerId: user.id, startsAt: '2025-03-03T10:00:00.000Z', kind: 'treatment' as const, status: 'completed' as const, notes: '', createdAt: nowIso(), updatedAt: nowIso() };
      await db.getRepository(Visit).insert(visit);
      const treatment = { id: newId(), visitId: visit.id, patientId: patient.id, practitionerId: user.id, treatedAt: visit.startsAt, treatedOn: '2025-03-03', anaesthetic: 'none', createdAt: nowIso(), updatedAt: nowIso() };
      await db.getRepository(Treatment).insert(treatment);
      const id = newId();
      await db.getRepository(Reminder).insert({ id, patientId: patient.id, visitId: visit.id, treatmentId: treatment.id, kind: 'review', dueOn: '2025-03-17', dueAt: '2025-03-17T09:00:00.000Z', state: 'scheduled', createdAt: nowIso() });
      ids.push(id);
    }
    const script = path.resolve('tests/helpers/reminder-pass.ts');
    const startAt = String(Date.now() + 4000);
    const outputs = await Promise.all(
      [1, 2, 3].map(() => run(process.execPath, ['--import', 'tsx', script, file, '2025-03-17T09:30:00.000Z', startAt], { timeout: 60_000 })),
    );
    const counts = outputs.map((o) => Number(o.stdout));
    expect(counts.reduce((a, b) => a + b, 0)).toBe(5);
    for (const id of ids) {
      expect(await db.getRepository(MailLog).countBy({ relatedType: 'reminder', relatedId: id })).toBe(1);
      expect((await db.getRepository(Reminder).findOneByOrFail({ id })).state).toBe('sent');
    }
    // A fourth start later ("after a restart") finds nothing left.
    const again = await run(process.execPath, ['--import', 'tsx', script, file, '2025-03-17T10:30:00.000Z', '0']);
    expect(again.stdout).toBe('0');
  }, 120_000);
});
