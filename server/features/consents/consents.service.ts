import type { Request } from 'express';
import { In, type DataSource, type EntityManager } from 'typeorm';
import type { Deps } from '../../deps.js';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import type { ChainFields } from '../../entities/record-chain.js';
import { ConsentTemplate, type ConsentKind, type ShowcaseChannel, type TemplateQuestion } from '../../entities/consent-template.js';
import { HandoverSession } from '../../entities/handover-session.js';
import { MailLog } from '../../entities/mail-log.js';
import { Patient } from '../../entities/patient.js';
import { User } from '../../entities/user.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, HttpError } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { queueMail } from '../../mail/outbox.js';
import { patientDocumentKey } from '../../storage/keys.js';
import { consentFileName, signedMail } from './consent-mail.js';
import { renderConsentPdf } from './consent-pdf.js';
import { canonicalJson, sha256Hex } from './hash.js';
import { formDone, parseProgress, parseTemplateIds } from './handover.service.js';
import type { signFormSchema } from './handover.schemas.js';
import { checkSignature, nameMatches } from './signature.js';
import type { z } from 'zod';
import { getSettings } from '../settings/settings.service.js';
import { rowIntact } from '../integrity/walk.js';
import { signingIdentity, signPdf, verifyPageUrl } from '../../signing/pdf-signing.js';

type SignInput = z.output<typeof signFormSchema>;

/** The signed content, independent of how the PDF is laid out: its SHA-256 is kept in the record and its evidence. */
export function consentContent(r: ConsentRecord) {
  return {
    id: r.id,
    patientId: r.patientId,
    templateId: r.templateId,
    kind: r.kind,
    templateVersion: r.templateVersion,
    templateSha256: r.templateSha256,
    answers: JSON.parse(r.answers) as Record<string, string>,
    channels: JSON.parse(r.channels) as ShowcaseChannel[],
    crop: r.crop,
    signerName: r.signerName,
    signatureSha256: r.signatureSha256,
    signedAt: r.signedAt,
    timeZone: r.timeZone,
  };
}

export const consentContentSha256 = (r: ConsentRecord) => sha256Hex(canonicalJson(consentContent(r)));

/** Checks answers against the form's questions; returns the cleaned answers and the flagged question ids. */
export function checkAnswers(questions: TemplateQuestion[], answers: Record<string, string>): { answers: Record<string, string>; flagged: string[] } {
  const known = new Set(questions.map((q) => q.id));
  const unknown = Object.keys(answers).filter((k) => !known.has(k));
  if (unknown.length) throw badRequest(`This form has no question "${unknown[0]}".`, { unknown }, 'ANSWERS_INVALID');
  const out: Record<string, string> = {};
  const problems: { question: string; message: string }[] = [];
  for (const q of questions) {
    const a = answers[q.id]?.trim() ?? '';
    if (a === '') {
      if (q.required) problems.push({ question: q.id, message: `Please answer: ${q.label}` });
      continue;
    }
    if (q.type === 'yes-no' && a !== 'yes' && a !== 'no') problems.push({ question: q.id, message: `Answer yes or no: ${q.label}` });
    else if (q.type === 'choice' && !q.options?.includes(a)) problems.push({ question: q.id, message: `Choose one of the options: ${q.label}` });
    else out[q.id] = a;
  }
  if (problems.length) throw badRequest(problems[0].message, problems, 'ANSWERS_INVALID');
  const flagged = questions.filter((q) => out[q.id] !== undefined && q.flagWhen?.includes(out[q.id])).map((q) => q.id);
  return { answers: out, flagged };
}

export interface SignResult {
  consent: ConsentRecord;
  warnings: { code: string; message: string }[];
  completed: boolean;
}

/**
 * Archives one signed form of a hand-over: checks everything first, renders and stores the stamped PDF
 * and the signature, then writes the record, its evidence, the hand-over progress and the patient's
 * e-mail in one transaction. On any failure nothing is left behind.
 */
export async function signForm(deps: Deps, req: Request, h: HandoverSession, templateId: string, input: SignInput): Promise<SignResult> {
  const { db, storage, config } = deps;
  const clinic = await getSettings(db, config);
  if (!parseTemplateIds(h).includes(templateId)) throw new HttpError(404, 'NOT_FOUND', 'This form is not part of the hand-over.');
  if (formDone(parseProgress(h)[templateId])) throw conflict('This form has already been completed.', undefined, 'FORM_ALREADY_DONE');
  const template = await db.getRepository(ConsentTemplate).findOneByOrFail({ id: templateId });
  if (template.status !== 'published' || !template.sha256) {
    throw conflict('The clinic has withdrawn this version of the form. Please hand the device back to the clinic.', { status: template.status }, 'TEMPLATE_RETIRED');
  }
  const patient = await db.getRepository(Patient).findOneByOrFail({ id: h.patientId });
  const questions = JSON.parse(template.questions) as TemplateQuestion[];
  const { answers, flagged } = checkAnswers(questions, input.answers);

  const offered = JSON.parse(template.channels) as ShowcaseChannel[];
  let channels: ShowcaseChannel[] = [];
  let crop: 'face' | 'lips-only' | null = null;
  if (template.kind === 'showcase') {
    const notOffered = input.channels.filter((c) => !offered.includes(c));
    if (notOffered.length) throw badRequest('A chosen channel is not offered on this form.', { notOffered }, 'CHANNELS_INVALID');
    if (input.channels.length === 0) {
      throw badRequest('Tick at least one place where your results may be shown, or choose not to sign this form.', { field: 'channels' }, 'CHANNELS_REQUIRED');
    }
    if (!input.crop) throw badRequest('Choose whether your whole face may be shown or only your lips.', { field: 'crop' }, 'CROP_REQUIRED');
    channels = offered.filter((c) => input.channels.includes(c));
    crop = input.crop;
  } else if (input.channels.length || input.crop) {
    throw badRequest('Only the showcase consent has channels and a crop choice.', undefined, 'CHANNELS_INVALID');
  }
  const signature = await checkSignature(input.signature);

  // A different spelling (a married name, a dropped accent) is not a reason to refuse a signature:
  // the record keeps the mismatch so staff can look at it.
  const matches = nameMatches(input.signerName, patient);
  const warnings = matches
    ? []
    : [{ code: 'NAME_MISMATCH', message: `The typed name "${input.signerName}" does not match the patient record (${patient.firstName} ${patient.lastName}). The signature is saved; staff will check it.` }];

  const startedBy = await db.getRepository(User).findOneBy({ id: h.createdById });
  const progress = parseProgress(h);
  const id = newId();
  const signedAt = nowIso();
  const signatureKey = patientDocumentKey({ patientId: patient.id, area: 'consents', id, name: 'signature', ext: 'png' });
  const pdfKey = patientDocumentKey({ patientId: patient.id, area: 'consents', id, name: 'signed', ext: 'pdf' });
  const record = db.getRepository(ConsentRecord).create({
    id,
    patientId: patient.id,
    templateId,
    kind: template.kind,
    templateVersion: template.version,
    templateSha256: template.sha256,
    handoverId: h.id,
    visitId: h.visitId,
    answers: JSON.stringify(answers),
    channels: JSON.stringify(channels),
    crop,
    flaggedQuestionIds: JSON.stringify(flagged),
    signerName: input.signerName,
    nameMatchesPatient: matches,
    signatureKey,
    signatureSha256: sha256Hex(signature.original),
    pdfKey,
    pdfSha256: '',
    contentSha256: '',
    timeZone: clinic.timeZone,
    shownAt: progress[templateId]?.shownAt ?? null,
    signedAt,
    startedById: h.createdById,
    signedIp: req.ip ?? null,
    signedUserAgent: req.get('user-agent')?.slice(0, 300) ?? null,
    withdrawnAt: null,
    withdrawnById: null,
    withdrawalReason: null,
    withdrawalDate: null,
  });
  record.contentSha256 = consentContentSha256(record);
  const verifyUrl = verifyPageUrl(config);
  const doc = await renderConsentPdf({
    recordId: id,
    clinicName: clinic.clinicName,
    template: { title: template.title, version: template.version, sha256: template.sha256, body: template.body, questions, channels: offered, kind: template.kind },
    patient,
    answers,
    flaggedQuestionIds: flagged,
    channels,
    crop,
    signerName: input.signerName,
    signaturePng: signature.normalised,
    signedAt,
    shownAt: record.shownAt,
    timeZone: clinic.timeZone,
    startedBy: startedBy ? `${startedBy.name} (${startedBy.role})` : 'clinic staff',
    signedIp: record.signedIp,
    signedUserAgent: record.signedUserAgent,
    verifyUrl,
  });
  const pdf = await signPdf(doc, await signingIdentity(db, config), {
    reason: `Consent of ${patient.firstName} ${patient.lastName}, form ${template.title} v${template.version}`,
    signingTime: new Date(signedAt),
    contactInfo: verifyUrl,
    location: clinic.clinicName,
  });
  record.pdfSha256 = sha256Hex(pdf);

  await storage.put(signatureKey, signature.original, 'image/png');
  try {
    await storage.put(pdfKey, pdf, 'application/pdf');
    const completed = await db.transaction(async (tx) => {
      await tx.getRepository(ConsentRecord).insert(record);
      const mail = patient.email
        ? await queueMail(tx, {
            to: patient.email,
            ...signedMail({ clinicName: clinic.clinicName, firstName: patient.firstName, title: template.title, kind: template.kind, version: template.version, signedAt, timeZone: clinic.timeZone, recordId: id, pdfSha256: record.pdfSha256, verifyUrl }),
            attachments: [{ key: pdfKey, filename: consentFileName(template.kind, template.version, signedAt), contentType: 'application/pdf' }],
            relatedType: 'consent',
            relatedId: id,
            patientId: patient.id,
          })
        : null;
      await writeSigningEvidence(tx, record, h, startedBy, mail?.id ?? null);
      const fresh = await tx.getRepository(HandoverSession).findOneByOrFail({ id: h.id });
      const p = parseProgress(fresh);
      p[templateId] = { ...p[templateId], signedAt, consentId: id };
      const done = parseTemplateIds(fresh).every((tid) => formDone(p[tid]));
      await tx.getRepository(HandoverSession).update({ id: h.id }, { progress: JSON.stringify(p), ...(done ? { completedAt: signedAt } : {}) });
      await audit(tx, req, { action: 'consent.sign', patientId: patient.id, targetType: 'consent', targetId: id, details: { kind: template.kind, version: template.version, flagged: flagged.length } });
      return done;
    });
    deps.mailer.kick();
    return { consent: record, warnings, completed };
  } catch (err) {
    await storage.remove([signatureKey, pdfKey]).catch(() => undefined);
    if (err instanceof Error && /UNIQUE constraint failed: consent_record/.test(err.message)) {
      throw conflict('This form has already been completed.', undefined, 'FORM_ALREADY_DONE');
    }
    throw err;
  }
}

async function writeSigningEvidence(tx: EntityManager, r: ConsentRecord, h: HandoverSession, startedBy: User | null, mailId: string | null) {
  const repo = tx.getRepository(ConsentEvidence);
  const rows: Omit<ConsentEvidence, 'id' | ChainFields>[] = [
    {
      consentId: r.id,
      at: h.createdAt,
      event: 'handover.started',
      actorId: h.createdById,
      actorRole: startedBy?.role ?? 'unknown',
      ip: h.createdIp,
      userAgent: h.createdUserAgent,
      details: JSON.stringify({ handoverId: h.id, mode: h.mode, expiresAt: h.expiresAt, startedByName: startedBy?.name ?? null }),
    },
  ];
  if (h.mode === 'second-device' && h.claimedAt) {
    rows.push({ consentId: r.id, at: h.claimedAt, event: 'handover.claimed', actorId: null, actorRole: 'handover', ip: h.claimedIp, userAgent: h.claimedUserAgent, details: '{}' });
  }
  if (r.shownAt) rows.push({ consentId: r.id, at: r.shownAt, event: 'form.shown', actorId: null, actorRole: 'handover', ip: r.signedIp, userAgent: r.signedUserAgent, details: '{}' });
  rows.push({
    consentId: r.id,
    at: r.signedAt,
    event: 'form.signed',
    actorId: null,
    actorRole: 'handover',
    ip: r.signedIp,
    userAgent: r.signedUserAgent,
    details: JSON.stringify({
      templateId: r.templateId,
      templateVersion: r.templateVersion,
      templateSha256: r.templateSha256,
      signatureSha256: r.signatureSha256,
      contentSha256: r.contentSha256,
      pdfSha256: r.pdfSha256,
      nameMatchesPatient: r.nameMatchesPatient,
      mailId,
    }),
  });
  // One row per insert (a bulk insert on SQLite re-assigns string ids).
  for (const row of rows) await repo.insert({ id: newId(), ...row });
}

export type ConsentState = 'current' | 'superseded' | 'withdrawn';

/** current: the newest signed form of its kind, not withdrawn; older ones are superseded. */
export function consentStates(records: ConsentRecord[]): Map<string, ConsentState> {
  const out = new Map<string, ConsentState>();
  const byKind = new Map<ConsentKind, ConsentRecord[]>();
  for (const r of records) byKind.set(r.kind, [...(byKind.get(r.kind) ?? []), r]);
  for (const list of byKind.values()) {
    list.sort((a, b) => (a.signedAt < b.signedAt ? 1 : -1));
    list.forEach((r, i) => out.set(r.id, r.withdrawnAt ? 'withdrawn' : i === 0 ? 'current' : 'superseded'));
  }
  return out;
}

/** Screening answers are clinical (DESIGN §2): coordinators see that a questionnaire exists, not what it says. */
export const canSeeClinicalContent = (req: Request, kind: ConsentKind) => kind !== 'screening' || req.user?.role !== 'coordinator';

/** Consent records as the API shows them, with their state, e-mail state and flag acknowledgement. */
export async function consentViews(db: DataSource | EntityManager, req: Request, records: ConsentRecord[], all: ConsentRecord[] = records) {
  if (!records.length) return [];
  const ids = records.map((r) => r.id);
  const [templates, mails, acks] = await Promise.all([
    db.getRepository(ConsentTemplate).findBy({ id: In([...new Set(records.map((r) => r.templateId))]) }),
    db.getRepository(MailLog).find({ where: { relatedType: In(['consent', 'consent-withdrawal']), relatedId: In(ids) }, order: { createdAt: 'ASC' } }),
    db.getRepository(ConsentEvidence).find({ where: { consentId: In(ids), event: 'flags.acknowledged' } }),
  ]);
  const titles = new Map(templates.map((t) => [t.id, t]));
  const states = consentStates(all);
  return records.map((r) => {
    const clinical = canSeeClinicalContent(req, r.kind);
    const mail = mails.find((m) => m.relatedType === 'consent' && m.relatedId === r.id);
    const withdrawalMail = mails.find((m) => m.relatedType === 'consent-withdrawal' && m.relatedId === r.id);
    const ack = acks.find((a) => a.consentId === r.id);
    const flagged = JSON.parse(r.flaggedQuestionIds) as string[];
    return {
      id: r.id,
      patientId: r.patientId,
      kind: r.kind,
      title: titles.get(r.templateId)?.title ?? '',
      templateId: r.templateId,
      templateVersion: r.templateVersion,
      templateSha256: r.templateSha256,
      templateStatus: titles.get(r.templateId)?.status ?? null,
      visitId: r.visitId,
      state: states.get(r.id) ?? (r.withdrawnAt ? 'withdrawn' : 'current'),
      signedAt: r.signedAt,
      shownAt: r.shownAt,
      signerName: r.signerName,
      nameMatchesPatient: r.nameMatchesPatient,
      answers: clinical ? (JSON.parse(r.answers) as Record<string, string>) : undefined,
      flaggedQuestionIds: clinical ? flagged : undefined,
      flaggedCount: flagged.length,
      flagsAcknowledgedAt: ack?.at ?? null,
      channels: JSON.parse(r.channels) as ShowcaseChannel[],
      crop: r.crop,
      pdfSha256: r.pdfSha256,
      contentSha256: r.contentSha256,
      canOpenPdf: clinical,
      email: mail ? { state: mail.state, sentAt: mail.sentAt, attempts: mail.attempts } : null,
      withdrawal: r.withdrawnAt
        ? { at: r.withdrawnAt, byId: r.withdrawnById, reason: r.withdrawalReason, date: r.withdrawalDate, email: withdrawalMail ? { state: withdrawalMail.state, sentAt: withdrawalMail.sentAt } : null }
        : null,
    };
  });
}

/**
 * Re-reads the stored PDF and signature and re-hashes them and the recorded content, and checks the record still
 * holds its place in the consent chain (a row rewritten with its hashes would otherwise compare equal to itself).
 */
export async function verifyConsent(deps: Deps, r: ConsentRecord) {
  const [pdf, sig] = await Promise.all([deps.storage.get(r.pdfKey), deps.storage.get(r.signatureKey)]);
  const pdfActual = sha256Hex(pdf);
  const sigActual = sha256Hex(sig);
  const contentActual = consentContentSha256(r);
  const checks = {
    pdf: { expected: r.pdfSha256, actual: pdfActual, ok: pdfActual === r.pdfSha256 },
    signature: { expected: r.signatureSha256, actual: sigActual, ok: sigActual === r.signatureSha256 },
    content: { expected: r.contentSha256, actual: contentActual, ok: contentActual === r.contentSha256 },
    chain: { ok: await rowIntact(deps.db, 'consent', r as unknown as Record<string, unknown>) },
  };
  const valid = checks.pdf.ok && checks.signature.ok && checks.content.ok && checks.chain.ok;
  return { consentId: r.id, status: valid ? ('valid' as const) : ('altered' as const), checkedAt: nowIso(), checks };
}
