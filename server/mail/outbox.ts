import type { Logger } from 'pino';
import { Brackets, type DataSource, type EntityManager } from 'typeorm';
import { MailLog, type MailAttachmentRef } from '../entities/mail-log.js';
import type { ObjectStore } from '../storage/object-store.js';
import { newId, nowIso } from '../lib/time.js';
import type { MailTransport } from './transport.js';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: MailAttachmentRef[];
  relatedType?: string;
  relatedId?: string;
  patientId?: string;
}

/**
 * Puts a mail in the outbox. Call it inside the transaction that stores the record the mail is about,
 * so the record and its mail are saved together; then `mailer.kick()` after the commit.
 */
export async function queueMail(db: DataSource | EntityManager, mail: OutgoingMail): Promise<MailLog> {
  const now = nowIso();
  const row = db.getRepository(MailLog).create({
    id: newId(),
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html ?? null,
    attachments: JSON.stringify(mail.attachments ?? []),
    state: 'pending',
    attempts: 0,
    nextAttemptAt: now,
    claimToken: null,
    claimedUntil: null,
    sentAt: null,
    messageId: null,
    lastError: null,
    relatedType: mail.relatedType ?? null,
    relatedId: mail.relatedId ?? null,
    patientId: mail.patientId ?? null,
    createdAt: now,
  });
  await db.getRepository(MailLog).insert(row);
  return row;
}

export interface MailerOptions {
  /** First retry delay; each later one doubles, up to `maxDelayMs`. */
  baseDelayMs: number;
  maxDelayMs: number;
  /** After this many attempts the mail is marked failed (an admin can queue it again). */
  maxAttempts: number;
  /** How long a worker may hold a claimed mail before another worker may take it over. */
  leaseMs: number;
  pollMs: number;
  batch: number;
}

export const DEFAULT_MAILER_OPTIONS: MailerOptions = {
  baseDelayMs: 30_000,
  maxDelayMs: 60 * 60_000,
  maxAttempts: 10,
  leaseMs: 2 * 60_000,
  pollMs: 5_000,
  batch: 20,
};

/** Delay before attempt `attempts + 1`, after `attempts` failed ones. */
export function backoffMs(attempts: number, o: Pick<MailerOptions, 'baseDelayMs' | 'maxDelayMs'> = DEFAULT_MAILER_OPTIONS): number {
  return Math.min(o.maxDelayMs, o.baseDelayMs * 2 ** Math.max(0, attempts - 1));
}

/** The outbox worker. All its state is in the database, so it survives restarts and runs on several instances. */
export interface Mailer {
  /** Starts polling the outbox. */
  start(): void;
  /** Stops polling and waits for a running pass to finish. */
  stop(): Promise<void>;
  /** Asks for a pass now (after queueing a mail); returns at once. */
  kick(): void;
  /** One pass over the due mails; `now` lets tests step over retry delays. Returns how many were sent. */
  runOnce(now?: Date): Promise<number>;
  /** Resolves when no pass is running. */
  idle(): Promise<void>;
}

export function createMailer(deps: {
  db: DataSource;
  storage: ObjectStore;
  transport: MailTransport;
  from: string;
  logger: Logger;
  options?: Partial<MailerOptions>;
}): Mailer {
  const o = { ...DEFAULT_MAILER_OPTIONS, ...deps.options };
  const repo = () => deps.db.getRepository(MailLog);
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<number> | null = null;
  let again = false;
  let stopped = false;

  /** Takes one mail for this worker with a conditional UPDATE: of several workers exactly one wins. */
  async function claim(id: string, now: Date): Promise<string | null> {
    const token = newId();
    const nowS = now.toISOString();
    const result = await deps.db
      .createQueryBuilder()
      .update(MailLog)
      .set({ state: 'sending', claimToken: token, claimedUntil: new Date(now.getTime() + o.leaseMs).toISOString(), attempts: () => '"attempts" + 1' })
      .where('id = :id', { id })
      .andWhere(
        new Brackets((w) =>
          w.where(`state = 'pending' AND "nextAttemptAt" <= :now`, { now: nowS }).orWhere(`state = 'sending' AND "claimedUntil" < :now`, { now: nowS }),
        ),
      )
      .execute();
    return result.affected === 1 ? token : null;
  }

  async function deliver(row: MailLog, token: string, now: Date): Promise<boolean> {
    try {
      const refs = JSON.parse(row.attachments) as MailAttachmentRef[];
      const attachments = [];
      for (const a of refs) attachments.push({ filename: a.filename, contentType: a.contentType, content: await deps.storage.get(a.key) });
      const domain = deps.from.match(/@([^>\s]+)/)?.[1] ?? 'twinframe.invalid';
      const info = await deps.transport.send({
        from: deps.from,
        to: row.to,
        subject: row.subject,
        text: row.text,
        html: row.html ?? undefined,
        attachments,
        messageId: `<${row.id}@${domain}>`,
      });
      await repo().update({ id: row.id, claimToken: token }, { state: 'sent', sentAt: nowIso(), messageId: info.messageId, claimToken: null, claimedUntil: null, lastError: null });
      return true;
    } catch (err) {
      const attempts = row.attempts + 1;
      const failed = attempts >= o.maxAttempts;
      const message = err instanceof Error ? err.message : String(err);
      deps.logger.warn({ mailId: row.id, attempts, err: message }, failed ? 'mail failed for good' : 'mail send failed; will retry');
      await repo().update(
        { id: row.id, claimToken: token },
        {
          state: failed ? 'failed' : 'pending',
          nextAttemptAt: new Date(now.getTime() + backoffMs(attempts, o)).toISOString(),
          lastError: message.slice(0, 500),
          claimToken: null,
          claimedUntil: null,
        },
      );
      return false;
    }
  }

  async function pass(now: Date): Promise<number> {
    const nowS = now.toISOString();
    const due = await repo()
      .createQueryBuilder('m')
      .select(['m.id'])
      .where(`(m.state = 'pending' AND m.nextAttemptAt <= :now) OR (m.state = 'sending' AND m.claimedUntil < :now)`, { now: nowS })
      .orderBy('m.nextAttemptAt', 'ASC')
      .limit(o.batch)
      .getMany();
    let sent = 0;
    for (const { id } of due) {
      if (stopped) break;
      const token = await claim(id, now);
      if (!token) continue;
      const row = await repo().findOneByOrFail({ id });
      // `row.attempts` already counts this attempt; deliver() expects the count before it.
      if (await deliver({ ...row, attempts: row.attempts - 1 }, token, now)) sent++;
    }
    return sent;
  }

  function runOnce(now?: Date): Promise<number> {
    if (running) {
      again = true;
      return running;
    }
    running = (async () => {
      let total = 0;
      do {
        again = false;
        total += await pass(now ?? new Date());
      } while (again && !stopped);
      return total;
    })().finally(() => {
      running = null;
    });
    return running;
  }

  const safeRun = () => {
    runOnce().catch((err) => deps.logger.error({ err }, 'outbox pass failed'));
  };

  return {
    start() {
      stopped = false;
      if (!timer) timer = setInterval(safeRun, o.pollMs);
      timer.unref();
      safeRun();
    },
    async stop() {
      stopped = true;
      if (timer) clearInterval(timer);
      timer = null;
      await running?.catch(() => undefined);
    },
    kick() {
      if (!stopped) safeRun();
    },
    runOnce,
    async idle() {
      while (running) await running.catch(() => undefined);
    },
  };
}
