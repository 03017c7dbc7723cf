import type { Router } from 'express';
import { In } from 'typeorm';
import type { Deps } from '../../deps.js';
import { MailLog } from '../../entities/mail-log.js';
import { HttpError } from '../../lib/errors.js';

/** A mail still waiting after this long means outgoing mail is not getting through. */
export const MAIL_QUEUE_MAX_AGE_MS = 15 * 60_000;
const CHECK_TIMEOUT_MS = 3_000;

type Check = { ok: true; ms: number } | { ok: false; ms: number; error: string };

async function timed(fn: () => Promise<unknown>): Promise<Check> {
  const started = Date.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([fn(), new Promise((_, reject) => (timer = setTimeout(() => reject(new Error(`no answer within ${CHECK_TIMEOUT_MS} ms`)), CHECK_TIMEOUT_MS)))]);
    return { ok: true, ms: Date.now() - started };
  } catch (err) {
    return { ok: false, ms: Date.now() - started, error: (err as Error).message.slice(0, 200) };
  } finally {
    clearTimeout(timer);
  }
}

/** Liveness (the process answers) and readiness (the parts it needs answer too), for load balancers and monitors. */
export function registerHealthRoutes(r: Router, { db, storage }: Deps): void {
  r.get('/api/health', (_req, res) => {
    res.json({ status: 'ok' });
  });

  r.get('/api/health/ready', async (_req, res) => {
    const checks = {
      database: await timed(() => db.query('SELECT 1')),
      'object-store': await timed(() => storage.ping()),
      'mail-queue': await timed(async () => {
        const oldest = await db.getRepository(MailLog).findOne({ where: { state: In(['pending', 'sending']) }, order: { createdAt: 'ASC' } });
        const age = oldest ? Date.now() - Date.parse(oldest.createdAt) : 0;
        if (age > MAIL_QUEUE_MAX_AGE_MS) throw new Error(`the oldest unsent mail has waited ${Math.round(age / 60_000)} minutes`);
      }),
    };
    const failing = Object.entries(checks).filter(([, c]) => !c.ok).map(([name]) => name);
    if (failing.length) {
      throw new HttpError(503, 'NOT_READY', `Not ready: ${failing.join(', ')} ${failing.length === 1 ? 'is' : 'are'} not answering.`, { failing, checks });
    }
    res.json({ status: 'ready', checks });
  });
}
