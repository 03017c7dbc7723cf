import type { Express, RequestHandler } from 'express';
import session from 'express-session';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { TypeormStore } from 'connect-typeorm';
import { csrfSync } from 'csrf-sync';
import type { DataSource } from 'typeorm';
import type { Config } from '../config.js';
import { Session } from '../entities/session.js';
import { User } from '../entities/user.js';
import { getSettings } from '../features/settings/settings.service.js';
import { checkCredentials } from './login.js';

export const SESSION_COOKIE = 'tf.sid';

export const csrf = csrfSync({
  getTokenFromRequest: (req) => req.get('x-csrf-token'),
  errorConfig: { statusCode: 403, code: 'CSRF_INVALID', message: 'Missing or invalid CSRF token. Reload the page and try again.' },
});

/** Sessions in SQLite (they survive a restart), idle logoff through a rolling cookie, passport-local and CSRF. */
export function installSessions(app: Express, db: DataSource, config: Config): passport.Authenticator {
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
      proxy: config.secureCookies,
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
      checkCredentials(db, req, email, password).then((user) => done(null, user), done);
    }),
  );
  pp.serializeUser((user, done) => done(null, user.id));
  pp.deserializeUser((id: string, done) => {
    db.getRepository(User)
      .findOneBy({ id })
      .then((u) => done(null, u && u.active ? { id: u.id, email: u.email, name: u.name, role: u.role } : false), done);
  });
  app.use(pp.initialize());
  app.use(pp.session());
  return pp;
}

/** CSRF check for every state-changing request (GET, HEAD, OPTIONS are exempt). */
export const csrfProtection: RequestHandler = csrf.csrfSynchronisedProtection;
