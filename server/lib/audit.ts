import type { Request } from 'express';
import { MoreThan, type DataSource, type EntityManager } from 'typeorm';
import { AuditEvent } from '../entities/audit-event.js';
import { newId, nowIso } from './time.js';

export interface AuditInput {
  action: string;
  patientId?: string | null;
  targetType?: string | null;
  targetId?: string | null;
  details?: Record<string, unknown>;
  /** Overrides for events without a signed-in actor (e.g. failed sign-in). */
  actorId?: string | null;
  actorRole?: string;
}

/** Appends one access-log row. Pass a transaction's manager to log inside it. */
export async function audit(db: DataSource | EntityManager, req: Request | null, input: AuditInput): Promise<void> {
  const user = req?.user;
  const handoverId = (req?.session as { handoverId?: string } | undefined)?.handoverId;
  await db.getRepository(AuditEvent).insert({
    id: newId(),
    at: nowIso(),
    actorId: input.actorId !== undefined ? input.actorId : (user?.id ?? null),
    actorRole: input.actorRole ?? user?.role ?? (handoverId ? 'handover' : 'anonymous'),
    action: input.action,
    patientId: input.patientId ?? null,
    targetType: input.targetType ?? null,
    targetId: input.targetId ?? null,
    ip: req?.ip ?? null,
    userAgent: req?.get('user-agent')?.slice(0, 300) ?? null,
    details: JSON.stringify(input.details ?? {}),
  });
}

/**
 * Like `audit`, but a repeat of the same action on the same target by the same person within `withinMs` is not
 * logged again (a screen that refreshes itself is one view, not dozens).
 */
export async function auditOnce(db: DataSource | EntityManager, req: Request, input: AuditInput & { targetId: string }, withinMs = 60_000): Promise<void> {
  const actorId = req.user?.id;
  if (actorId) {
    const since = new Date(Date.now() - withinMs).toISOString();
    const seen = await db.getRepository(AuditEvent).existsBy({ actorId, action: input.action, targetId: input.targetId, at: MoreThan(since) });
    if (seen) return;
  }
  await audit(db, req, input);
}
