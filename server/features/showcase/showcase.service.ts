import { In, type DataSource, type EntityManager } from 'typeorm';
import { ConsentRecord } from '../../entities/consent-record.js';
import { Photo } from '../../entities/photo.js';
import { ShowcaseExport, ShowcaseRequest, type ShowcaseChannel } from '../../entities/showcase.js';
import { User } from '../../entities/user.js';
import { audit } from '../../lib/audit.js';
import { HttpError } from '../../lib/errors.js';
import { nowIso } from '../../lib/time.js';
import { queueMail } from '../../mail/outbox.js';
import { onConsentWithdrawn } from '../consents/consent-events.js';
import { consentStates } from '../consents/consents.service.js';
import { CHANNEL_LABEL } from './showcase.schemas.js';

export interface ShowcaseConsentStatus {
  consent: ConsentRecord | null;
  channels: ShowcaseChannel[];
  crop: 'face' | 'lips-only' | null;
}

/** The patient's current showcase consent (newest signed, not withdrawn), with what it allows. */
export async function currentShowcaseConsent(db: DataSource | EntityManager, patientId: string): Promise<ShowcaseConsentStatus> {
  const records = await db.getRepository(ConsentRecord).findBy({ patientId, kind: 'showcase' });
  const states = consentStates(records);
  const consent = records.find((r) => states.get(r.id) === 'current') ?? null;
  return {
    consent,
    channels: consent ? (JSON.parse(consent.channels) as ShowcaseChannel[]) : [],
    crop: consent ? ((consent.crop as 'face' | 'lips-only' | null) ?? 'lips-only') : null,
  };
}

/**
 * Refuses a marketing use that the patient's signed showcase consent does not cover, saying exactly what is
 * missing (HIPAA 45 CFR 164.508(a)(3): a separate authorization; GDPR Art. 7: specific, current consent).
 */
export function assertCovered(status: ShowcaseConsentStatus, channels: ShowcaseChannel[]): void {
  if (!status.consent) {
    throw new HttpError(409, 'NO_SHOWCASE_CONSENT', 'This patient has no current signed showcase consent. Ask them to sign one in hand-over before any marketing use.', { missing: 'consent' });
  }
  const missing = channels.filter((c) => !status.channels.includes(c));
  if (missing.length) {
    throw new HttpError(409, 'CHANNEL_NOT_CONSENTED', `The patient's showcase consent does not cover: ${missing.map((c) => CHANNEL_LABEL[c]).join(', ')}.`, { missing: 'channels', channels: missing });
  }
}

/** Photos of one patient and one view, current (not replaced), returned in time order. */
export async function photosForRequest(db: DataSource | EntityManager, patientId: string, viewKey: string, photoIds: string[]): Promise<Photo[]> {
  if (new Set(photoIds).size !== photoIds.length) throw new HttpError(400, 'DUPLICATE_PHOTO', 'A photo is listed twice.');
  const photos = await db.getRepository(Photo).findBy({ id: In(photoIds) });
  if (photos.length !== photoIds.length || photos.some((p) => p.patientId !== patientId)) {
    throw new HttpError(400, 'UNKNOWN_PHOTO', "A chosen photo is not one of this patient's.");
  }
  if (photos.some((p) => p.viewKey !== viewKey)) throw new HttpError(400, 'MIXED_VIEWS', 'A showcase shows one view: all photos must be of the same view.');
  return photos.sort((a, b) => (a.capturedAt < b.capturedAt ? -1 : 1));
}

/**
 * Withdrawal cascade: when a showcase consent is withdrawn, every open or cleared request made under it is
 * withdrawn in the same transaction, and each admin gets a list of what was exported where, for takedown.
 */
async function cascade(tx: EntityManager, consent: ConsentRecord, req: Parameters<typeof audit>[1]): Promise<void> {
  if (consent.kind !== 'showcase') return;
  const requests = await tx.getRepository(ShowcaseRequest).findBy({ consentId: consent.id, state: In(['requested', 'cleared']) });
  if (!requests.length) return;
  const now = nowIso();
  for (const r of requests) {
    await tx.getRepository(ShowcaseRequest).update({ id: r.id }, { state: 'withdrawn', withdrawnAt: now, withdrawnReason: 'Showcase consent withdrawn by the patient.' });
    await audit(tx, req, { action: 'showcase.withdrawn', patientId: r.patientId, targetType: 'showcase_request', targetId: r.id, details: { cause: 'consent_withdrawn', consentId: consent.id } });
  }
  const exports = await tx.getRepository(ShowcaseExport).find({ where: { requestId: In(requests.map((r) => r.id)) }, order: { exportedAt: 'ASC' } });
  const admins = await tx.getRepository(User).findBy({ role: 'admin', active: true });
  const lines = exports.length
    ? exports.map((e) => `- ${e.exportedAt.slice(0, 10)} · ${CHANNEL_LABEL[e.channel]} · request ${e.requestId.slice(0, 8)} · files: ${e.files.map((f) => `${f.name} (sha256 ${f.sha256.slice(0, 16)}…)`).join(', ')}`)
    : ['- Nothing had been exported yet.'];
  const text = [
    'A patient has withdrawn their showcase (marketing) consent.',
    '',
    `${requests.length} showcase request(s) were withdrawn at once; no further exports are possible.`,
    'Earlier exports, for takedown from each channel:',
    ...lines,
    '',
    'Open the showcase clearance queue in Twinframe for the details.',
  ].join('\n');
  for (const admin of admins) {
    await queueMail(tx, { to: admin.email, subject: 'Showcase consent withdrawn: take down these exports', text, relatedType: 'consent_record', relatedId: consent.id, patientId: consent.patientId });
  }
}

onConsentWithdrawn(({ consent, tx, req }) => cascade(tx, consent, req));
