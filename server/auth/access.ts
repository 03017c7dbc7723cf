import type { Request, RequestHandler } from 'express';
import type { Role } from '../entities/user.js';
import { forbidden, HttpError, unauthorized } from '../lib/errors.js';

declare global {
  namespace Express {
    interface User {
      id: string;
      email: string;
      name: string;
      role: Role;
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    /** Set while the device is in a patient's hand-over session; no staff user is signed in then. */
    handoverId?: string;
    /** When the staff user signed in on this session; the absolute lifetime and "sessions valid from" count from it. */
    signedInAt?: string;
  }
}

export type Principal = Role | 'handover';

const SESSION_ENDED = 'Your session has ended. Please sign in again.';

function sessionCookiePresent(req: Request): boolean {
  return (req.get('cookie') ?? '').includes('tf.sid=');
}

/**
 * The one role check of the API: every non-public route starts with it.
 * Anonymous → 401; signed in with another role → 403.
 */
export function allow(...principals: Principal[]): RequestHandler {
  return (req, _res, next) => {
    const role: Principal | undefined = req.user?.role ?? (req.session?.handoverId ? 'handover' : undefined);
    if (!role) {
      next(sessionCookiePresent(req) ? new HttpError(401, 'SESSION_ENDED', SESSION_ENDED) : unauthorized());
      return;
    }
    if (!principals.includes(role)) {
      next(role === 'handover' ? forbidden('This tablet is in hand-over mode.') : forbidden());
      return;
    }
    next();
  };
}

export const STAFF: Role[] = ['admin', 'practitioner', 'coordinator'];
export const CLINICAL: Role[] = ['admin', 'practitioner'];

/** The signed-in staff user of a request that passed `allow()`. */
export function currentUser(req: Request): Express.User {
  if (!req.user) throw unauthorized();
  return req.user;
}
