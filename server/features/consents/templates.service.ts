import type { ConsentTemplate, ShowcaseChannel, TemplateQuestion } from '../../entities/consent-template.js';
import { canonicalJson, sha256Hex } from './hash.js';

/** The content a published version fixes; its SHA-256 identifies exactly what a patient was shown. */
export function templateContent(t: Pick<ConsentTemplate, 'familyId' | 'version' | 'kind' | 'title' | 'body' | 'questions' | 'channels'>) {
  return {
    familyId: t.familyId,
    version: t.version,
    kind: t.kind,
    title: t.title,
    body: t.body,
    questions: JSON.parse(t.questions) as TemplateQuestion[],
    channels: JSON.parse(t.channels) as ShowcaseChannel[],
  };
}

export function templateSha256(t: Parameters<typeof templateContent>[0]): string {
  return sha256Hex(canonicalJson(templateContent(t)));
}

/** A template as the API shows it. */
export function templateView(t: ConsentTemplate) {
  return {
    id: t.id,
    familyId: t.familyId,
    kind: t.kind,
    version: t.version,
    title: t.title,
    body: t.body,
    questions: JSON.parse(t.questions) as TemplateQuestion[],
    channels: JSON.parse(t.channels) as ShowcaseChannel[],
    status: t.status,
    sha256: t.sha256,
    createdById: t.createdById,
    createdAt: t.createdAt,
    updatedAt: t.updatedAt,
    publishedAt: t.publishedAt,
    retiredAt: t.retiredAt,
  };
}

export type TemplateView = ReturnType<typeof templateView>;
