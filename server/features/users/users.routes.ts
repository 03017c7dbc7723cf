import type { Router } from 'express';
import { z } from 'zod';
import { allow, currentUser, STAFF } from '../../auth/access.js';
import { hashPassword } from '../../auth/passwords.js';
import { liftSignInLimits } from '../../auth/login.js';
import { endUserSessions } from '../../auth/session.js';
import type { Deps } from '../../deps.js';
import { User } from '../../entities/user.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { createUserSchema, resetPasswordSchema, updateUserSchema } from './users.schemas.js';

/** The shape of a user in API answers: never the password hash. */
export const publicUser = (u: User) => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role,
  active: u.active,
  createdAt: u.createdAt,
});

const idParams = z.object({ id: uuidParam });

export function registerUserRoutes(r: Router, { db }: Deps): void {
  const users = db.getRepository(User);

  r.get('/api/users', allow('admin'), async (_req, res) => {
    const rows = await users.find({ order: { active: 'DESC', name: 'ASC' } });
    res.json(rows.map(publicUser));
  });

  /** Staff who can be booked for a visit. */
  r.get('/api/practitioners', allow(...STAFF), async (_req, res) => {
    const rows = await users.find({ where: [{ role: 'practitioner', active: true }, { role: 'admin', active: true }], order: { name: 'ASC' } });
    res.json(rows.map((u) => ({ id: u.id, name: u.name, role: u.role })));
  });

  const create = validate({ body: createUserSchema });
  r.post('/api/users', allow('admin'), create, async (req, res) => {
    const { body } = parsed(req, create);
    if (await users.existsBy({ email: body.email })) {
      throw conflict('A user with this e-mail already exists.', { field: 'email' }, 'EMAIL_TAKEN');
    }
    const now = nowIso();
    const user = users.create({
      id: newId(),
      email: body.email,
      name: body.name,
      role: body.role,
      passwordHash: await hashPassword(body.password),
      active: true,
      createdAt: now,
      updatedAt: now,
    });
    await users.insert(user);
    await audit(db, req, { action: 'user.create', targetType: 'user', targetId: user.id, details: { role: user.role } });
    res.status(201).json(publicUser(user));
  });

  const update = validate({ params: idParams, body: updateUserSchema });
  r.patch('/api/users/:id', allow('admin'), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    const user = await users.findOneBy({ id: params.id });
    if (!user) throw notFound('User');
    const me = currentUser(req);
    if (user.id === me.id && (body.active === false || (body.role && body.role !== 'admin'))) {
      throw badRequest('You cannot deactivate yourself or remove your own admin role.');
    }
    // A new role or a deactivation must not ride on sessions signed in under the old one.
    const endSessions = (body.role !== undefined && body.role !== user.role) || (body.active === false && user.active);
    Object.assign(user, body, { updatedAt: nowIso() });
    await db.transaction(async (tx) => {
      await tx.getRepository(User).save(user);
      if (endSessions) await endUserSessions(tx, user.id);
      await audit(tx, req, { action: 'user.update', targetType: 'user', targetId: user.id, details: { ...body, sessionsEnded: endSessions } });
    });
    res.json(publicUser(user));
  });

  const reset = validate({ params: idParams, body: resetPasswordSchema });
  r.post('/api/users/:id/password', allow('admin'), reset, async (req, res) => {
    const { params, body } = parsed(req, reset);
    const user = await users.findOneBy({ id: params.id });
    if (!user) throw notFound('User');
    user.passwordHash = await hashPassword(body.password);
    user.updatedAt = nowIso();
    await db.transaction(async (tx) => {
      await tx.getRepository(User).save(user);
      await endUserSessions(tx, user.id);
      await audit(tx, req, { action: 'user.password_reset', targetType: 'user', targetId: user.id });
    });
    res.status(204).end();
  });

  const byId = validate({ params: idParams });
  /** Signs a user out on every device (a lost tablet, a shared password). */
  r.post('/api/users/:id/sessions/end', allow('admin'), byId, async (req, res) => {
    const { params } = parsed(req, byId);
    if (!(await users.existsBy({ id: params.id }))) throw notFound('User');
    await endUserSessions(db, params.id);
    await audit(db, req, { action: 'user.sessions_end', targetType: 'user', targetId: params.id });
    res.status(204).end();
  });

  /** Lifts the sign-in delays and address limits of an account at once (see THROTTLE). */
  r.post('/api/users/:id/unlock', allow('admin'), byId, async (req, res) => {
    const { params } = parsed(req, byId);
    const user = await users.findOneBy({ id: params.id });
    if (!user) throw notFound('User');
    const cleared = await liftSignInLimits(db, user.email);
    await audit(db, req, { action: 'user.sign_in_unlock', targetType: 'user', targetId: user.id, details: { failuresCleared: cleared } });
    res.status(204).end();
  });
}
