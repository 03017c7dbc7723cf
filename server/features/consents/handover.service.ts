import { randomBytes, randomInt } from 'node:crypto';
import type { Request } from 'express';
import type { DataSource, EntityManager } from 'typeorm';
import { ConsentTemplate } from '../../entities/consent-template.js';
import { HandoverSession, type HandoverFormProgress } from '../../entities/handover-session.js';
import { HttpError } from '../../lib/errors.js';
import { sha256Hex } from './hash.js';
import { templateView } from './templates.service.js';

/** Letters and digits that cannot be mistaken for each other when read aloud or typed (no 0/O, 1/I/L). */
const CODE_ALPHABET = 'ABCDEFGHJKMNPQRSTUVWXYZ23456789';
const CODE_LENGTH = 8;

/** A short code such as "K7QM-4XRP" for joining a hand-over on a second device. */
export function newHandoverCode(): string {
  let s = '';
  for (let i = 0; i < CODE_LENGTH; i++) s += CODE_ALPHABET[randomInt(CODE_ALPHABET.length)];
  return `${s.slice(0, 4)}-${s.slice(4)}`;
}

export const normaliseCode = (code: string) => code.toUpperCase().replace(/[^A-Z0-9]/g, '');
export const codeHash = (code: string) => sha256Hex(`handover-code:${normaliseCode(code)}`);
export const tokenHash = (token: string) => sha256Hex(`handover-token:${token}`);
export const newHandoverToken = () => randomBytes(32).toString('base64url');

export const parseProgress = (h: HandoverSession) => JSON.parse(h.progress) as Record<string, HandoverFormProgress>;
export const parseTemplateIds = (h: HandoverSession) => JSON.parse(h.templateIds) as string[];

/** A form counts as done when it was signed, or (for an optional form) declined. */
export const formDone = (p: HandoverFormProgress | undefined) => Boolean(p?.signedAt || p?.declinedAt);

export const handoverEnded = () =>
  new HttpError(401, 'HANDOVER_ENDED', 'This hand-over has ended. Please hand the device back to the clinic.');

/** Why a hand-over can no longer be used, or null while it is open. */
export function closedReason(h: HandoverSession, now = new Date()): 'cancelled' | 'expired' | null {
  if (h.cancelledAt) return 'cancelled';
  if (Date.parse(h.expiresAt) <= now.getTime()) return 'expired';
  return null;
}

/**
 * The hand-over bound to this device's session. An expired or cancelled one is unbound from the
 * session at once, so the device needs a staff sign-in before it shows anything again.
 */
export async function boundHandover(db: DataSource | EntityManager, req: Request): Promise<HandoverSession> {
  const id = req.session.handoverId;
  const h = id ? await db.getRepository(HandoverSession).findOneBy({ id }) : null;
  if (!h || closedReason(h)) {
    delete req.session.handoverId;
    throw handoverEnded();
  }
  return h;
}

/** The forms of a hand-over with their progress, as the patient's device shows them. */
export async function handoverForms(db: DataSource | EntityManager, h: HandoverSession) {
  const ids = parseTemplateIds(h);
  const progress = parseProgress(h);
  const rows = await db.getRepository(ConsentTemplate).findBy(ids.map((id) => ({ id })));
  const byId = new Map(rows.map((t) => [t.id, t]));
  return ids.map((id) => {
    const t = byId.get(id)!;
    const p = progress[id] ?? {};
    return {
      ...templateView(t),
      templateId: id,
      optional: t.kind === 'showcase',
      state: p.signedAt ? ('signed' as const) : p.declinedAt ? ('declined' as const) : t.status !== 'published' ? ('unavailable' as const) : ('to-do' as const),
      shownAt: p.shownAt ?? null,
      signedAt: p.signedAt ?? null,
      consentId: p.consentId ?? null,
    };
  });
}
