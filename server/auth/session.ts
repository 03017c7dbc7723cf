import type { Express, Request, RequestHandler } from 'express';
import session from 'express-session';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { TypeormStore } from 'connect-typeorm';
import { csrfSync } from 'csrf-sync';
import type { DataSource, EntityManager } from 'typeorm';
import { nowIso } from '../lib/time.js';
import type { Config } from '../config.js';
import { Session } from '../entities/session.js';
import { User } from '../entities/user.js';
import { getSettings } from '../features/settings/settings.service.js';
import { checkCredentials } from './login.js';
import type { Mailer } from '../mail/outbox.js';

export const SESSION_COOKIE = 'tf.sid';

export const csrf = csrfSync({
  getTokenFromRequest: (req) => req.get('x-csrf-token'),
  errorConfig: { statusCode: 403, code: 'CSRF_INVALID', message: 'Missing or invalid CSRF token. Reload the page and try again.' },
});

/** Sessions in SQLite (they survive a restart), idle logoff through a rolling cookie, passport-local and CSRF. */
export function installSessions(app: Express, db: DataSource, config: Config, mailer?: Mailer): passport.Authenticator {
  // No fixed ttl: the store keeps each session as long as its cookie's maxAge, i.e. the idle timeout.
  const store = new TypeormStore({ cleanupLimit: 2 }).connect(db.getRepository(Session));
  app.use(
    session({
      name: SESSION_COOKIE,
      secret: config.sessionSecret,
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: 'strict',
        secure: config.secureCookies,
        maxAge: config.idleMinutes * 60_000,
      },
    }),
  );

  // The idle timeout is a clinic setting; apply the current value to every session on each request.
  app.use((req, _res, next) => {
    getSettings(db, config).then((s) => {
      req.session.cookie.maxAge = s.idleMinutes * 60_000;
      next();
    }, next);
  });

  const pp = new passport.Passport();
  pp.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', passReqToCallback: true }, (req, email, password, done) => {
      checkCredentials(db, req, email, password, () => mailer?.kick()).then((user) => done(null, user), done);
    }),
  );
  pp.serializeUser((user, done) => done(null, user.id));
  // Each request re-reads the user, so a deactivation, a password reset, a role change, "sign out everywhere" or
  // the absolute lifetime ends the session at once on every instance (nothing is kept in process memory).
  pp.deserializeUser((req: Request, id: string, done: (err: unknown, user?: Express.User | false) => void) => {
    Promise.all([db.getRepository(User).findOneBy({ id }), getSettings(db, config)]).then(([u, settings]) => {
      const signedInAt = req.session.signedInAt;
      const alive =
        u?.active &&
        signedInAt !== undefined &&
        (!u.sessionsValidFrom || signedInAt >= u.sessionsValidFrom) &&
        Date.parse(signedInAt) + settings.sessionHours * 3_600_000 > Date.now();
      done(null, alive ? { id: u.id, email: u.email, name: u.name, role: u.role } : false);
    }, done);
  });
  app.use(pp.initialize());
  app.use(pp.session());
  return pp;
}

/** Ends every session of a user, on every device and instance, from now on. */
export async function endUserSessions(db: DataSource | EntityManager, userId: string): Promise<void> {
  await db.getRepository(User).update({ id: userId }, { sessionsValidFrom: nowIso() });
}

/** CSRF check for every state-changing request (GET, HEAD, OPTIONS are exempt). */
export const csrfProtection: RequestHandler = csrf.csrfSynchronisedProtection;
