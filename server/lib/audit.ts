import type { Request } from 'express';
import { MoreThan, type DataSource, type EntityManager } from 'typeorm';
import { AuditEvent } from '../entities/audit-event.js';
import { inTransaction } from '../features/integrity/chain.js';
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

/**
 * Appends one access-log row to its chain. Pass a transaction's manager to log inside it (as its last write: the
 * access chain's head stays locked until that transaction ends); with the data source it is a transaction of its own.
 */
export async function audit(db: DataSource | EntityManager, req: Request | null, input: AuditInput): Promise<void> {
  const user = req?.user;
  const handoverId = (req?.session as { handoverId?: string } | undefined)?.handoverId;
  await inTransaction(db, (tx) => tx.getRepository(AuditEvent).insert({
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
  }));
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

/** Reads of one patient's data by one person within this window count as one screen opened. */
export const SCREEN_WINDOW_MS = 60_000;

/**
 * Logs a read of one patient's data (HIPAA 164.312(b) audit controls) as one entry per screen: a read by a person
 * who already has an entry naming this patient within `SCREEN_WINDOW_MS` is covered by it. So opening a patient
 * (its record, visits, consents, photo list and thumbnails) is one row, not one per list or per thumbnail; reads
 * of a single document or full-size photo keep their own entries through `audit`.
 */
export async function auditPatientRead(db: DataSource | EntityManager, req: Request, input: AuditInput & { patientId: string }): Promise<void> {
  const actorId = req.user?.id;
  if (actorId) {
    const since = new Date(Date.now() - SCREEN_WINDOW_MS).toISOString();
    if (await db.getRepository(AuditEvent).existsBy({ actorId, patientId: input.patientId, at: MoreThan(since) })) return;
  }
  await audit(db, req, input);
}

/** Logs a read of a clinic-wide list that names several patients (search, clinic day, queues): once a screen. */
export function auditListRead(db: DataSource | EntityManager, req: Request, list: string, details?: Record<string, unknown>): Promise<void> {
  return auditOnce(db, req, { action: `${list}.view`, targetType: 'list', targetId: list, details }, SCREEN_WINDOW_MS);
}
