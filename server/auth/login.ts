import type { Request } from 'express';
import { MoreThan, type DataSource } from 'typeorm';
import { LoginFailure } from '../entities/login-failure.js';
import { User } from '../entities/user.js';
import { audit } from '../lib/audit.js';
import { HttpError } from '../lib/errors.js';
import { newId, nowIso } from '../lib/time.js';
import { alertAdmins } from '../mail/admin-alert.js';
import { verifyPassword } from './passwords.js';

/**
 * Sign-in throttling that slows guessing without locking the clinic out (OWASP ASVS 4.0 2.2.1; the numbers are
 * common practice). Failures count per account within the window:
 * - after `freeFailures`, each attempt on the account waits 2^(n − freeFailures) s after the last failure, at most
 *   `maxDelaySeconds`: the real user waits seconds, a guesser gets a few hundred tries a day at most;
 * - one address gets `perAccountAndAddress` failures on one account, then that pair waits out the window (other
 *   addresses, other accounts and the clinic's own NAT address for everyone else are unaffected);
 * - `clinicAlert` failures across the clinic, or an address reaching its limit, mail the admins (once a window).
 * An admin lifts an account's limits at once from the users screen.
 */
export const THROTTLE = { windowMinutes: 15, freeFailures: 3, maxDelaySeconds: 60, perAccountAndAddress: 10, clinicAlert: 20 };

const INVALID = () => new HttpError(401, 'INVALID_CREDENTIALS', 'E-mail or password is incorrect.');

/** Seconds an account must wait after its last failure, with `failures` in the window. */
export function delaySeconds(failures: number): number {
  return failures < THROTTLE.freeFailures ? 0 : Math.min(THROTTLE.maxDelaySeconds, 2 ** (failures - THROTTLE.freeFailures));
}

function tooSoon(req: Request, seconds: number, code: string, message: string): HttpError {
  req.res?.set('Retry-After', String(seconds));
  return new HttpError(429, code, message, { retryAfterSeconds: seconds });
}

/**
 * Checks a sign-in. Unknown e-mail and wrong password give the same answer and the same timing, and are throttled
 * alike, so the answers do not reveal which accounts exist. `onAlert` runs after admins were mailed.
 */
export async function checkCredentials(db: DataSource, req: Request, rawEmail: string, password: string, onAlert?: () => void): Promise<Express.User> {
  const email = rawEmail.trim().toLowerCase();
  const ip = req.ip ?? 'unknown';
  const since = new Date(Date.now() - THROTTLE.windowMinutes * 60_000).toISOString();
  const failures = db.getRepository(LoginFailure);
  const [byAccount, byPair, last] = await Promise.all([
    failures.countBy({ email, at: MoreThan(since) }),
    failures.countBy({ email, ip, at: MoreThan(since) }),
    failures.findOne({ where: { email, at: MoreThan(since) }, order: { at: 'DESC' } }),
  ]);
  if (byPair >= THROTTLE.perAccountAndAddress) {
    await audit(db, req, { action: 'auth.login_limited', details: { email } });
    throw tooSoon(req, THROTTLE.windowMinutes * 60, 'SIGN_IN_LIMIT', `Too many failed sign-ins for this account from this network. Try again in ${THROTTLE.windowMinutes} minutes, or ask an admin to lift the limit.`);
  }
  const wait = last ? Math.ceil(delaySeconds(byAccount) - (Date.now() - Date.parse(last.at)) / 1000) : 0;
  if (wait > 0) {
    await audit(db, req, { action: 'auth.login_delayed', details: { email, seconds: wait } });
    throw tooSoon(req, wait, 'SIGN_IN_DELAY', `Several sign-ins to this account failed. Wait ${wait} second${wait === 1 ? '' : 's'}, then try again.`);
  }
  const user = await db.getRepository(User).findOneBy({ email });
  const ok = await verifyPassword(user?.passwordHash ?? null, password);
  if (!user || !ok || !user.active) {
    await failures.insert({ id: newId(), email, ip, at: nowIso() });
    await audit(db, req, { action: 'auth.login_failed', actorId: user?.id ?? null, details: { email } });
    const clinicWide = await failures.countBy({ at: MoreThan(since) });
    const reachedLimit = byPair + 1 >= THROTTLE.perAccountAndAddress;
    if (reachedLimit || clinicWide >= THROTTLE.clinicAlert) {
      const queued = await alertAdmins(db, {
        subject: 'Failed sign-ins to Twinframe',
        text: `${clinicWide} sign-ins failed in the last ${THROTTLE.windowMinutes} minutes. The latest was for ${email} from ${ip}${reachedLimit ? ', which has now reached its limit from that address' : ''}.\n\nIf this was not your team, someone may be guessing passwords: check the access log (action auth.login_failed), and reset the passwords of any account named there. An admin can lift an account's limits on the Users screen.`,
        relatedType: 'sign-in-alert',
        // One alert a window for the clinic as a whole, and one for each account that reaches its limit.
        relatedId: reachedLimit ? (user?.id ?? 'unknown-account') : 'clinic',
        onceWithinMs: THROTTLE.windowMinutes * 60_000,
      });
      if (queued) onAlert?.();
    }
    throw INVALID();
  }
  await failures.delete({ email, ip });
  return { id: user.id, email: user.email, name: user.name, role: user.role };
}

/** An admin lifts every sign-in limit of an account (after the user proved who they are). */
export async function liftSignInLimits(db: DataSource, email: string): Promise<number> {
  const { affected } = await db.getRepository(LoginFailure).delete({ email: email.toLowerCase() });
  return affected ?? 0;
}
