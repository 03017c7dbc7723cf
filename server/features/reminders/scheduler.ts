import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Config } from '../../config.js';
import { Patient } from '../../entities/patient.js';
import { Reminder } from '../../entities/reminder.js';
import { Treatment } from '../../entities/treatment.js';
import { nowIso } from '../../lib/time.js';
import { queueMail, type Mailer } from '../../mail/outbox.js';
import { getSettings } from '../settings/settings.service.js';
import { reminderMail } from './reminder-mail.js';

export interface ReminderSchedulerOptions {
  pollMs: number;
  batch: number;
  /** A reminder found more than this many days after its due time (e.g. the server was off) is cancelled, not sent late. */
  maxLateDays: number;
}

export const DEFAULT_REMINDER_OPTIONS: ReminderSchedulerOptions = { pollMs: 60_000, batch: 50, maxLateDays: 7 };

/**
 * Hands due reminders to the mail outbox. All state is in the database: each reminder is taken by one conditional
 * UPDATE (`state = 'scheduled'`) in the same transaction that queues its mail, so it is queued exactly once however
 * many schedulers run and however often they restart.
 */
export interface ReminderScheduler {
  start(): void;
  stop(): Promise<void>;
  /** One pass; `now` lets tests step through time. Returns how many reminders were queued. */
  runOnce(now?: Date): Promise<number>;
}

class LostClaim extends Error {}

export function createReminderScheduler(deps: {
  db: DataSource;
  config: Config;
  logger: Logger;
  mailer: Pick<Mailer, 'kick'>;
  options?: Partial<ReminderSchedulerOptions>;
}): ReminderScheduler {
  const o = { ...DEFAULT_REMINDER_OPTIONS, ...deps.options };
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<number> | null = null;
  let stopped = false;

  async function cancel(id: string, reason: string): Promise<void> {
    await deps.db.getRepository(Reminder).update({ id, state: 'scheduled' }, { state: 'cancelled', cancelledAt: nowIso(), cancelledById: null, cancelReason: reason });
  }

  async function handle(r: Reminder, now: Date): Promise<boolean> {
    const patient = await deps.db.getRepository(Patient).findOneBy({ id: r.patientId });
    if (!patient || patient.archived) {
      await cancel(r.id, 'Not sent: the patient record is archived.');
      return false;
    }
    if (!patient.email) {
      await cancel(r.id, 'Not sent: the patient has no e-mail address.');
      return false;
    }
    if (now.getTime() - Date.parse(r.dueAt) > o.maxLateDays * 86_400_000) {
      await cancel(r.id, `Not sent: more than ${o.maxLateDays} days past its date when the scheduler reached it.`);
      return false;
    }
    const treatment = await deps.db.getRepository(Treatment).findOneBy({ id: r.treatmentId });
    const { clinicName } = await getSettings(deps.db, deps.config);
    const mail = reminderMail({ kind: r.kind, patient, clinicName, treatedOn: treatment?.treatedOn ?? r.dueOn, dueOn: r.dueOn });
    try {
      await deps.db.transaction(async (tx) => {
        const queued = await queueMail(tx, { to: patient.email!, subject: mail.subject, text: mail.text, relatedType: 'reminder', relatedId: r.id, patientId: r.patientId });
        const claimed = await tx
          .getRepository(Reminder)
          .createQueryBuilder()
          .update(Reminder)
          .set({ state: 'sent', sentAt: nowIso(), mailId: queued.id })
          .where(`id = :id AND state = 'scheduled'`, { id: r.id })
          .execute();
        // Another scheduler (or a cancellation) got there first: roll the mail back with it.
        if (claimed.affected !== 1) throw new LostClaim();
      });
      return true;
    } catch (err) {
      if (err instanceof LostClaim) return false;
      throw err;
    }
  }

  async function pass(now: Date): Promise<number> {
    const due = await deps.db
      .getRepository(Reminder)
      .createQueryBuilder('r')
      .where(`r.state = 'scheduled' AND r.dueAt <= :now`, { now: now.toISOString() })
      .orderBy('r.dueAt', 'ASC')
      .limit(o.batch)
      .getMany();
    let queued = 0;
    for (const r of due) {
      if (stopped) break;
      if (await handle(r, now)) queued++;
    }
    if (queued) deps.mailer.kick();
    return queued;
  }

  function runOnce(now?: Date): Promise<number> {
    if (running) return running;
    running = pass(now ?? new Date()).finally(() => {
      running = null;
    });
    return running;
  }

  return {
    start() {
      stopped = false;
      const tick = () => {
        runOnce().catch((err) => deps.logger.error({ err }, 'reminder pass failed'));
      };
      if (!timer) timer = setInterval(tick, o.pollMs);
      timer.unref();
      tick();
    },
    async stop() {
      stopped = true;
      if (timer) clearInterval(timer);
      timer = null;
      await running?.catch(() => undefined);
    },
    runOnce,
  };
}
