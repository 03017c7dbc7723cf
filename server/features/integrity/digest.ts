import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Config } from '../../config.js';
import { ChainDigest } from '../../entities/record-chain.js';
import { User } from '../../entities/user.js';
import { dayIn, nowIso, zonedHourToUtc } from '../../lib/time.js';
import { queueMail, type Mailer } from '../../mail/outbox.js';
import { getSettings } from '../settings/settings.service.js';
import { CHAINS } from './chain.js';
import { chainHeads, walkChains, type ChainReport } from './walk.js';

/** The daily e-mail to every active admin with the chain heads (and today's walk), kept as proof of what the chains were. */
export function digestMail(p: { clinicName: string; day: string; heads: Awaited<ReturnType<typeof chainHeads>>; reports: ChainReport[]; appUrl: string }) {
  const broken = p.reports.filter((r) => !r.ok);
  const text = [
    `Record chain heads of ${p.clinicName} on ${p.day}.`,
    '',
    'Keep this e-mail. Each line is the last row of a tamper-evident chain and the hash that row leads to. If a record',
    'is ever rewritten, even together with its stored hash, the chain no longer leads to these values, and the next',
    'check says which row was changed (Admin → Record integrity, or `npm run verify:records` on the server).',
    '',
    ...Object.values(CHAINS).map((c) => `${c.label}: row #${p.heads[c.name].seq}, ${p.heads[c.name].hash}`),
    '',
    broken.length
      ? `WARNING: today's check found a broken chain. ${broken.map((r) => `${r.label}: ${r.problem?.message}`).join(' ')}`
      : `Today's check: all ${p.reports.length} chains verify from their first row to these heads.`,
    '',
    `${p.appUrl}/admin/integrity`,
  ].join('\n');
  return { subject: `${broken.length ? 'Broken record chain: ' : ''}Record chain heads for ${p.day}, ${p.clinicName}`, text };
}

export interface DigestScheduler {
  start(): void;
  stop(): Promise<void>;
  /** Sends today's digest if it is due and not sent yet; returns the number of mails queued. */
  runOnce(now?: Date): Promise<number>;
}

/**
 * Once a day, from `digestHour` o'clock clinic time, queues the digest to every active admin. The day's digest row
 * (primary key: the day) is written in the same transaction as the mails, so however many instances run this, one
 * wins and the others roll back: the heads go out exactly once a day.
 */
export function createDigestScheduler(deps: { db: DataSource; config: Config; logger: Logger; mailer: Pick<Mailer, 'kick'>; pollMs?: number }): DigestScheduler {
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<number> | null = null;

  async function pass(now: Date): Promise<number> {
    const { clinicName, timeZone } = await getSettings(deps.db, deps.config);
    const day = dayIn(timeZone, now);
    if (now.toISOString() < zonedHourToUtc(day, deps.config.digestHour, timeZone)) return 0;
    if (await deps.db.getRepository(ChainDigest).existsBy({ day })) return 0;
    const reports = await walkChains(deps.db);
    try {
      const n = await deps.db.transaction(async (tx) => {
        const heads = await chainHeads(tx);
        const admins = await tx.getRepository(User).findBy({ role: 'admin', active: true });
        await tx.getRepository(ChainDigest).insert({ day, createdAt: nowIso(), heads: JSON.stringify(heads), recipients: admins.length });
        const mail = digestMail({ clinicName, day, heads, reports, appUrl: deps.config.publicUrl });
        for (const a of admins) await queueMail(tx, { to: a.email, ...mail, relatedType: 'chain-digest', relatedId: day });
        return admins.length;
      });
      if (n) deps.mailer.kick();
      return n;
    } catch (err) {
      // Another instance wrote today's digest first.
      if (await deps.db.getRepository(ChainDigest).existsBy({ day })) return 0;
      throw err;
    }
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
      const tick = () => {
        runOnce().catch((err) => deps.logger.error({ err }, 'record chain digest failed'));
      };
      if (!timer) timer = setInterval(tick, deps.pollMs ?? 10 * 60_000);
      timer.unref();
      tick();
    },
    async stop() {
      if (timer) clearInterval(timer);
      timer = null;
      await running?.catch(() => undefined);
    },
    runOnce,
  };
}
