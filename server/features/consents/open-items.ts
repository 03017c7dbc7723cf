import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import type { ConsentKind } from '../../entities/consent-template.js';
import type { Visit, VisitKind } from '../../entities/visit.js';
import { KIND_LABELS } from './consent-mail.js';
import { canSeeClinicalContent } from './consents.service.js';

/**
 * Forms each kind of visit needs before it can go ahead. Photos are taken at every visit; treatment
 * needs its own consent and a fresh health questionnaire. The showcase consent is never required.
 */
export const REQUIRED_FORMS: Record<VisitKind, ConsentKind[]> = {
  consultation: ['photography', 'screening'],
  treatment: ['treatment', 'screening', 'photography'],
  review: ['photography'],
  'follow-up': ['photography'],
};

/**
 * How long a signed form counts for a later visit. Screening answers change (pregnancy, new medicines,
 * dental work), so clinics ask again before each treatment; a treatment consent is renewed yearly.
 * Both are common practice, not a rule of law; a clinic may choose other periods.
 */
export const FORM_VALID_DAYS: Partial<Record<ConsentKind, number>> = { screening: 30, treatment: 365 };

export interface OpenItem {
  type: 'consent-missing' | 'consent-withdrawn' | 'consent-outdated' | 'screening-flags';
  kind: ConsentKind;
  consentId?: string;
  message: string;
  flaggedQuestionIds?: string[];
}

/** What is missing before a visit can go ahead: unsigned, withdrawn or outdated forms and unreviewed screening flags. */
export async function openItemsForVisit(db: DataSource, req: Request, visit: Visit): Promise<OpenItem[]> {
  const records = await db.getRepository(ConsentRecord).find({ where: { patientId: visit.patientId }, order: { signedAt: 'DESC' } });
  const items: OpenItem[] = [];
  const visitAt = Date.parse(visit.startsAt);
  for (const kind of REQUIRED_FORMS[visit.kind]) {
    const latest = records.find((r) => r.kind === kind);
    const label = KIND_LABELS[kind];
    if (!latest) {
      items.push({ type: 'consent-missing', kind, message: `No signed ${label}.` });
      continue;
    }
    if (latest.withdrawnAt) {
      items.push({ type: 'consent-withdrawn', kind, consentId: latest.id, message: `The ${label} was withdrawn on ${latest.withdrawalDate}.` });
      continue;
    }
    const days = FORM_VALID_DAYS[kind];
    if (days !== undefined && Date.parse(latest.signedAt) < visitAt - days * 86_400_000) {
      items.push({ type: 'consent-outdated', kind, consentId: latest.id, message: `The ${label} was signed more than ${days} days before this visit; ask for a new one.` });
      continue;
    }
    const flagged = JSON.parse(latest.flaggedQuestionIds) as string[];
    if (kind === 'screening' && flagged.length) {
      const acked = await db.getRepository(ConsentEvidence).existsBy({ consentId: latest.id, event: 'flags.acknowledged' });
      if (!acked) {
        items.push({
          type: 'screening-flags',
          kind,
          consentId: latest.id,
          message: `${flagged.length} screening answer${flagged.length === 1 ? '' : 's'} need${flagged.length === 1 ? 's' : ''} the practitioner's review.`,
          flaggedQuestionIds: canSeeClinicalContent(req, kind) ? flagged : undefined,
        });
      }
    }
  }
  return items;
}
