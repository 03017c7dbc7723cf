import type { Request } from 'express';
import { In, type DataSource, type EntityManager } from 'typeorm';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { ConsentTemplate, type TemplateQuestion } from '../../entities/consent-template.js';
import { User } from '../../entities/user.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, HttpError } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';

/** The evidence event the consent records use for a practitioner's review of flagged answers. */
export const FLAGS_ACKNOWLEDGED = 'flags.acknowledged';

export interface ScreeningFlag {
  questionId: string;
  label: string;
  answer: string;
  acknowledged: boolean;
  note: string | null;
  acknowledgedAt: string | null;
  acknowledgedByName: string | null;
}

/** The latest screening questionnaire of a patient as the practitioner reviews it before treatment. */
export interface ScreeningReview {
  consentId: string;
  title: string;
  templateVersion: number;
  signedAt: string;
  signerName: string;
  answers: { questionId: string; label: string; type: TemplateQuestion['type']; answer: string | null; flagged: boolean }[];
  flags: ScreeningFlag[];
  allAcknowledged: boolean;
}

interface AckDetails {
  note?: string;
  /** Per-question notes, written by the screening review of the treatment screen. */
  notes?: Record<string, string>;
}

/**
 * The patient's latest screening questionnaire, or null when there is none or the latest was withdrawn (an older
 * one does not stand in for it: the open items then ask for a new questionnaire).
 */
export async function latestScreening(db: DataSource | EntityManager, patientId: string): Promise<ConsentRecord | null> {
  const latest = await db.getRepository(ConsentRecord).findOne({ where: { patientId, kind: 'screening' }, order: { signedAt: 'DESC' } });
  return latest && !latest.withdrawnAt ? latest : null;
}

/** Builds the review of one screening record: its answers, its flags and which of them a practitioner acknowledged. */
export async function screeningReview(db: DataSource | EntityManager, record: ConsentRecord): Promise<ScreeningReview> {
  const template = await db.getRepository(ConsentTemplate).findOneByOrFail({ id: record.templateId });
  const questions = JSON.parse(template.questions) as TemplateQuestion[];
  const answers = JSON.parse(record.answers) as Record<string, string>;
  const flagged = JSON.parse(record.flaggedQuestionIds) as string[];
  const acks = await db.getRepository(ConsentEvidence).find({ where: { consentId: record.id, event: FLAGS_ACKNOWLEDGED }, order: { at: 'ASC' } });
  const actorIds = [...new Set(acks.map((a) => a.actorId).filter((x): x is string => Boolean(x)))];
  const actors = actorIds.length ? await db.getRepository(User).findBy({ id: In(actorIds) }) : [];
  const nameOf = (id: string | null) => actors.find((u) => u.id === id)?.name ?? null;

  const flags: ScreeningFlag[] = flagged.map((qid) => {
    const q = questions.find((x) => x.id === qid);
    // The latest acknowledgement that covers this question: per-question notes, or one note for all flags.
    const ack = [...acks].reverse().find((a) => {
      const d = JSON.parse(a.details) as AckDetails;
      return d.notes ? qid in d.notes : true;
    });
    const d = ack ? (JSON.parse(ack.details) as AckDetails) : null;
    return {
      questionId: qid,
      label: q?.label ?? qid,
      answer: answers[qid] ?? '',
      acknowledged: Boolean(ack),
      note: d ? (d.notes?.[qid] ?? d.note ?? null) : null,
      acknowledgedAt: ack?.at ?? null,
      acknowledgedByName: ack ? nameOf(ack.actorId) : null,
    };
  });
  return {
    consentId: record.id,
    title: template.title,
    templateVersion: record.templateVersion,
    signedAt: record.signedAt,
    signerName: record.signerName,
    answers: questions.map((q) => ({ questionId: q.id, label: q.label, type: q.type, answer: answers[q.id] ?? null, flagged: flagged.includes(q.id) })),
    flags,
    allAcknowledged: flags.every((f) => f.acknowledged),
  };
}

/** Refuses to record a treatment while the latest screening has a flag no practitioner acknowledged. */
export async function assertScreeningCleared(db: DataSource | EntityManager, patientId: string): Promise<ScreeningReview | null> {
  const record = await latestScreening(db, patientId);
  if (!record) return null;
  const review = await screeningReview(db, record);
  const open = review.flags.filter((f) => !f.acknowledged);
  if (open.length) {
    throw new HttpError(
      409,
      'SCREENING_FLAGS_UNACKNOWLEDGED',
      `Review the flagged screening answers first: ${open.length} ${open.length === 1 ? 'answer needs' : 'answers need'} your acknowledgement with a note.`,
      { consentId: record.id, questionIds: open.map((f) => f.questionId) },
    );
  }
  return review;
}

/**
 * Records the practitioner's review of flagged answers, one note per flag, as evidence on the screening record
 * (the same event the consent records show) and in the access log.
 */
export async function acknowledgeFlags(
  tx: EntityManager,
  req: Request,
  input: { consentId: string; visitId: string; patientId: string; notes: { questionId: string; note: string }[] },
): Promise<void> {
  const record = await tx.getRepository(ConsentRecord).findOneBy({ id: input.consentId });
  if (!record || record.kind !== 'screening' || record.patientId !== input.patientId) {
    throw badRequest("That is not a screening questionnaire of this visit's patient.", { field: 'consentId' });
  }
  if (record.withdrawnAt) throw conflict('This questionnaire was withdrawn; ask the patient to complete a new one.');
  const review = await screeningReview(tx, record);
  if (!review.flags.length) throw conflict('This questionnaire has no flagged answers.', undefined, 'NO_FLAGS');
  if (review.allAcknowledged) throw conflict('The flagged answers were already reviewed.', undefined, 'ALREADY_ACKNOWLEDGED');
  const flagIds = new Set(review.flags.map((f) => f.questionId));
  const unknown = input.notes.filter((n) => !flagIds.has(n.questionId));
  if (unknown.length) throw badRequest('Only flagged answers can be acknowledged.', { questionIds: unknown.map((n) => n.questionId) });
  if (new Set(input.notes.map((n) => n.questionId)).size !== input.notes.length) throw badRequest('Acknowledge each flagged answer once.');
  // All open flags at once: the consent records read any acknowledgement event as covering the whole questionnaire.
  const missing = review.flags.filter((f) => !f.acknowledged && !input.notes.some((n) => n.questionId === f.questionId));
  if (missing.length) throw badRequest('Write a note for each flagged answer.', { questionIds: missing.map((f) => f.questionId) });
  const notes = Object.fromEntries(input.notes.map((n) => [n.questionId, n.note]));
  await tx.getRepository(ConsentEvidence).insert({
    id: newId(),
    consentId: record.id,
    at: nowIso(),
    event: FLAGS_ACKNOWLEDGED,
    actorId: req.user?.id ?? null,
    actorRole: req.user?.role ?? 'unknown',
    ip: req.ip ?? null,
    userAgent: req.get('user-agent')?.slice(0, 300) ?? null,
    // `note` and `flaggedQuestionIds` as the consent records' own acknowledgement writes them, plus one note per flag.
    details: JSON.stringify({
      note: input.notes.map((n) => `${review.flags.find((f) => f.questionId === n.questionId)?.label ?? n.questionId} — ${n.note}`).join('\n'),
      notes,
      flaggedQuestionIds: review.flags.map((f) => f.questionId),
      byName: req.user?.name ?? null,
      visitId: input.visitId,
    } satisfies AckDetails & Record<string, unknown>),
  });
  await audit(tx, req, {
    action: 'consent.flags_acknowledge',
    patientId: record.patientId,
    targetType: 'consent',
    targetId: record.id,
    details: { flagged: review.flags.length, visitId: input.visitId, questionIds: Object.keys(notes) },
  });
}
