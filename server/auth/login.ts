import type { Request } from 'express';
import { MoreThan, type DataSource } from 'typeorm';
import { LoginFailure } from '../entities/login-failure.js';
import { User } from '../entities/user.js';
import { audit } from '../lib/audit.js';
import { HttpError } from '../lib/errors.js';
import { newId, nowIso } from '../lib/time.js';
import { verifyPassword } from './passwords.js';

export const LOCKOUT = { failures: 5, perAddress: 50, minutes: 15 };

const INVALID = () => new HttpError(401, 'INVALID_CREDENTIALS', 'E-mail or password is incorrect.');

/**
 * Checks a sign-in. Unknown e-mail and wrong password give the same answer and the same timing;
 * after repeated failures the e-mail (known or not) and the address are locked for a while.
 */
export async function checkCredentials(db: DataSource, req: Request, rawEmail: string, password: string): Promise<Express.User> {
  const email = rawEmail.trim().toLowerCase();
  const ip = req.ip ?? 'unknown';
  const since = new Date(Date.now() - LOCKOUT.minutes * 60_000).toISOString();
  const failures = db.getRepository(LoginFailure);
  const [byEmail, byIp] = await Promise.all([
    failures.countBy({ email, at: MoreThan(since) }),
    failures.countBy({ ip, at: MoreThan(since) }),
  ]);
  if (byEmail >= LOCKOUT.failures || byIp >= LOCKOUT.perAddress) {
    await audit(db, req, { action: 'auth.login_locked', details: { email } });
    throw new HttpError(429, 'LOCKED_OUT', `Too many failed sign-ins. Try again in ${LOCKOUT.minutes} minutes.`);
  }
  const user = await db.getRepository(User).findOneBy({ email });
  const ok = await verifyPassword(user?.passwordHash ?? null, password);
  if (!user || !ok || !user.active) {
    await failures.insert({ id: newId(), email, ip, at: nowIso() });
    await audit(db, req, { action: 'auth.login_failed', actorId: user?.id ?? null, details: { email } });
    throw INVALID();
  }
  await failures.delete({ email });
  return { id: user.id, email: user.email, name: user.name, role: user.role };
}
