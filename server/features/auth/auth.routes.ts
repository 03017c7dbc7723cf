import type { Router } from 'express';
import { allow, currentUser, STAFF } from '../../auth/access.js';
import { csrf, endUserSessions, SESSION_COOKIE } from '../../auth/session.js';
import { nowIso } from '../../lib/time.js';
import type { Deps } from '../../deps.js';
import { audit } from '../../lib/audit.js';
import { HttpError } from '../../lib/errors.js';
import { validate } from '../../lib/validate.js';
import { loginSchema } from './auth.schemas.js';
import { getSettings } from '../settings/settings.service.js';

export function registerAuthRoutes(r: Router, { db, config }: Deps): void {
  /** The signed-in user, with the idle timeout so the client can clear the screen on time too. */
  const me = async (user: Express.User) => ({ ...user, idleMinutes: (await getSettings(db, config)).idleMinutes });

  r.get('/api/auth/csrf', (req, res) => {
    res.json({ token: csrf.generateToken(req) });
  });

  r.post('/api/auth/login', validate({ body: loginSchema }), (req, res, next) => {
    req.app.locals.passport.authenticate('local', (err: unknown, user: Express.User | false) => {
      if (err) return next(err);
      if (!user) return next(new HttpError(400, 'BAD_REQUEST', 'Enter your e-mail and password.'));
      req.login(user, (loginErr) => {
        if (loginErr) return next(loginErr);
        req.session.signedInAt = nowIso();
        audit(db, req, { action: 'auth.login' })
          .then(() => me(user))
          .then((body) => res.json(body))
          .catch(next);
      });
    })(req, res, next);
  });

  r.post('/api/auth/logout', allow(...STAFF, 'handover'), async (req, res) => {
    await audit(db, req, { action: 'auth.logout' });
    await new Promise<void>((resolve, reject) => req.logout((e) => (e ? reject(e) : resolve())));
    await new Promise<void>((resolve, reject) => req.session.destroy((e) => (e ? reject(e) : resolve())));
    res.clearCookie(SESSION_COOKIE);
    res.status(204).end();
  });

  /** "Sign out everywhere": ends every session of the signed-in user, this one included. */
  r.post('/api/auth/sessions/end', allow(...STAFF), async (req, res) => {
    const user = currentUser(req);
    await endUserSessions(db, user.id);
    await audit(db, req, { action: 'auth.sessions_end', targetType: 'user', targetId: user.id });
    await new Promise<void>((resolve, reject) => req.session.destroy((e) => (e ? reject(e) : resolve())));
    res.clearCookie(SESSION_COOKIE);
    res.status(204).end();
  });

  r.get('/api/auth/me', allow(...STAFF), async (req, res) => {
    res.json(await me(req.user!));
  });
}
