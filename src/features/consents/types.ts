export type ConsentKind = 'treatment' | 'photography' | 'showcase' | 'screening';
export type TemplateStatus = 'draft' | 'published' | 'retired';
export type ShowcaseChannel = 'clinic-website' | 'social-media' | 'print' | 'professional-education';
export type Crop = 'face' | 'lips-only';

export interface TemplateQuestion {
  id: string;
  type: 'yes-no' | 'text' | 'choice';
  label: string;
  help?: string;
  options?: string[];
  required: boolean;
  /** Answers that need a clinician's review. */
  flagWhen?: string[];
}

export interface ConsentTemplate {
  id: string;
  familyId: string;
  kind: ConsentKind;
  version: number;
  title: string;
  body: string;
  questions: TemplateQuestion[];
  channels: ShowcaseChannel[];
  status: TemplateStatus;
  sha256: string | null;
  createdAt: string;
  updatedAt: string;
  publishedAt: string | null;
  retiredAt: string | null;
}

export type ConsentState = 'current' | 'superseded' | 'withdrawn';
export type MailState = 'pending' | 'sending' | 'sent' | 'failed';

export interface Consent {
  id: string;
  patientId: string;
  kind: ConsentKind;
  title: string;
  templateId: string;
  templateVersion: number;
  templateSha256: string;
  templateStatus: TemplateStatus | null;
  visitId: string | null;
  state: ConsentState;
  signedAt: string;
  shownAt: string | null;
  signerName: string;
  nameMatchesPatient: boolean;
  /** Left out for coordinators on a health questionnaire. */
  answers?: Record<string, string>;
  flaggedQuestionIds?: string[];
  flaggedCount: number;
  flagsAcknowledgedAt: string | null;
  channels: ShowcaseChannel[];
  crop: Crop | null;
  pdfSha256: string;
  contentSha256: string;
  canOpenPdf: boolean;
  email: { state: MailState; sentAt: string | null; attempts: number } | null;
  withdrawal: { at: string; byId: string | null; reason: string | null; date: string | null; email: { state: MailState; sentAt: string | null } | null } | null;
}

export interface ConsentVerification {
  consentId: string;
  status: 'valid' | 'altered';
  checkedAt: string;
  checks: Record<'pdf' | 'signature' | 'content', { expected: string; actual: string; ok: boolean }>;
}

export interface OpenItem {
  type: 'consent-missing' | 'consent-withdrawn' | 'consent-outdated' | 'screening-flags';
  kind: ConsentKind;
  consentId?: string;
  message: string;
  flaggedQuestionIds?: string[];
}

export interface OpenItems {
  visitId: string;
  ready: boolean;
  items: OpenItem[];
}

export type FormState = 'to-do' | 'signed' | 'declined' | 'unavailable';

/** A form inside the hand-over, as the patient's device sees it. */
export interface HandoverForm extends ConsentTemplate {
  templateId: string;
  optional: boolean;
  state: FormState;
  shownAt: string | null;
  signedAt: string | null;
  consentId: string | null;
}

export interface CurrentHandover {
  id: string;
  clinicName: string;
  expiresAt: string;
  completed: boolean;
  patient: { firstName: string; lastName: string };
  forms: HandoverForm[];
}

export interface HandoverStatus {
  id: string;
  mode: 'this-device' | 'second-device';
  patientId: string;
  createdAt: string;
  expiresAt: string;
  claimedAt: string | null;
  completedAt: string | null;
  cancelledAt: string | null;
  state: 'waiting' | 'in-progress' | 'completed' | 'expired' | 'cancelled';
  forms: { templateId: string; kind: ConsentKind; title: string; version: number; state: FormState; consentId: string | null }[];
}

export interface StartedHandover {
  id: string;
  mode: 'this-device' | 'second-device';
  patientId: string;
  expiresAt: string;
  csrfToken?: string;
  code?: string;
  path?: string;
}

export interface OutboxMail {
  id: string;
  to: string;
  subject: string;
  state: MailState;
  attempts: number;
  nextAttemptAt: string | null;
  sentAt: string | null;
  lastError: string | null;
  relatedType: string | null;
  relatedId: string | null;
  createdAt: string;
  attachments: { filename: string; contentType: string }[];
  text?: string;
}

export const KIND_LABEL: Record<ConsentKind, string> = {
  treatment: 'Treatment consent',
  photography: 'Clinical photography consent',
  showcase: 'Showcase consent',
  screening: 'Health questionnaire',
};

export const CHANNEL_LABEL: Record<ShowcaseChannel, string> = {
  'clinic-website': 'Clinic website',
  'social-media': 'Social media',
  print: 'Print',
  'professional-education': 'Professional education',
};

export const SHOWCASE_CHANNELS = Object.keys(CHANNEL_LABEL) as ShowcaseChannel[];
