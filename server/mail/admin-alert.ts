import { MoreThan, type DataSource, type EntityManager } from 'typeorm';
import { MailLog } from '../entities/mail-log.js';
import { User } from '../entities/user.js';
import { queueMail } from './outbox.js';

export interface AdminAlert {
  subject: string;
  text: string;
  /** What the alert is about; one alert per (relatedType, relatedId) within `onceWithinMs`. */
  relatedType: string;
  relatedId: string;
  patientId?: string;
  onceWithinMs?: number;
}

/**
 * Mails every active admin about something that needs a person (an altered document, a sign-in attack), through
 * the outbox so an SMTP outage delays it but never loses it. Repeats within the window are not queued again.
 * Returns whether mails were queued; call `mailer.kick()` after the commit.
 */
export async function alertAdmins(db: DataSource | EntityManager, alert: AdminAlert): Promise<boolean> {
  const since = new Date(Date.now() - (alert.onceWithinMs ?? 24 * 3_600_000)).toISOString();
  if (await db.getRepository(MailLog).existsBy({ relatedType: alert.relatedType, relatedId: alert.relatedId, createdAt: MoreThan(since) })) return false;
  const admins = await db.getRepository(User).findBy({ role: 'admin', active: true });
  for (const a of admins) {
    await queueMail(db, { to: a.email, subject: alert.subject, text: alert.text, relatedType: alert.relatedType, relatedId: alert.relatedId, patientId: alert.patientId });
  }
  return admins.length > 0;
}
