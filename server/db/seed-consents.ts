import type { Request } from 'express';
import sharp from 'sharp';
import { In } from 'typeorm';
import type { Deps } from '../deps.js';
import { ConsentRecord } from '../entities/consent-record.js';
import { ConsentTemplate, type ShowcaseChannel, type TemplateQuestion } from '../entities/consent-template.js';
import { HandoverSession } from '../entities/handover-session.js';
import { Patient } from '../entities/patient.js';
import { User } from '../entities/user.js';
import { signForm } from '../features/consents/consents.service.js';
import { newHandoverToken, tokenHash } from '../features/consents/handover.service.js';
import { newId, nowIso } from '../lib/time.js';

/**
 * Which demo patients have signed which forms. The later patients sign nothing, so the clinic day still shows
 * what is missing; two have signed the optional showcase consent.
 */
const PLAN: { code: string; kinds: string[]; showcase?: { channels: ShowcaseChannel[]; crop: 'face' | 'lips-only' } }[] = [
  { code: 'LR-0001', kinds: ['screening', 'treatment', 'photography', 'showcase'], showcase: { channels: ['clinic-website', 'social-media'], crop: 'face' } },
  { code: 'LR-0002', kinds: ['screening', 'treatment', 'photography', 'showcase'], showcase: { channels: ['clinic-website'], crop: 'lips-only' } },
  { code: 'LR-0003', kinds: ['screening', 'treatment', 'photography'] },
  { code: 'LR-0004', kinds: ['photography'] },
  { code: 'LR-0005', kinds: ['screening', 'treatment', 'photography'] },
  { code: 'LR-0006', kinds: ['screening'] },
];

/** An invented signature: a pen stroke drawn as SVG, as the signature pad would send it. */
async function demoSignature(seed: number): Promise<string> {
  const y = (k: number) => 60 + ((seed * 37 + k * 53) % 90);
  const path = `M30 ${y(1)} C 90 ${y(2)}, 150 ${y(3)}, 210 ${y(4)} S 330 ${y(5)}, 390 ${y(6)} S 500 ${y(7)}, 560 ${y(8)}`;
  const png = await sharp({ create: { width: 600, height: 200, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
    .composite([{ input: Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="600" height="200"><path d="${path}" stroke="#1b1b1b" stroke-width="4" fill="none" stroke-linecap="round"/></svg>`) }])
    .png()
    .toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}

/** The answer to each required question that raises no flag. */
function unflaggedAnswers(questions: TemplateQuestion[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const q of questions) {
    if (!q.required) continue;
    if (q.type === 'yes-no') out[q.id] = q.flagWhen?.includes('yes') ? 'no' : 'yes';
    else if (q.type === 'choice') out[q.id] = q.options?.find((o) => !q.flagWhen?.includes(o)) ?? q.options?.[0] ?? '';
    else out[q.id] = 'None';
  }
  return out;
}

/**
 * Signs the demo forms through the same code as a hand-over (PDF, hash, evidence, e-mailed copy), so the consents
 * tab, verification and the showcase screens have real records to show. Runs once; returns the number signed.
 */
export async function seedDemoConsents(deps: Deps, opts: { stopped?: () => boolean } = {}): Promise<number> {
  const { db } = deps;
  if ((await db.getRepository(ConsentRecord).count()) > 0) return 0;
  const templates = await db.getRepository(ConsentTemplate).findBy({ status: 'published' });
  const staff = await db.getRepository(User).findOneBy({ role: 'practitioner', active: true });
  if (!staff || !templates.length) return 0;
  const patients = await db.getRepository(Patient).findBy({ code: In(PLAN.map((p) => p.code)) });
  let signed = 0;
  for (const [i, plan] of PLAN.entries()) {
    const patient = patients.find((p) => p.code === plan.code);
    const forms = plan.kinds.map((k) => templates.find((t) => t.kind === k)).filter((t): t is ConsentTemplate => Boolean(t));
    if (!patient || !forms.length) continue;
    const now = nowIso();
    const h = db.getRepository(HandoverSession).create({
      id: newId(),
      tokenHash: tokenHash(newHandoverToken()),
      codeHash: null,
      mode: 'this-device',
      patientId: patient.id,
      visitId: null,
      templateIds: JSON.stringify(forms.map((f) => f.id)),
      progress: '{}',
      expiresAt: new Date(Date.now() + 30 * 60_000).toISOString(),
      createdById: staff.id,
      createdAt: now,
      createdIp: '127.0.0.1',
      createdUserAgent: 'Twinframe demo seed',
      claimedAt: now,
      claimedIp: '127.0.0.1',
      claimedUserAgent: 'Twinframe demo seed',
      completedAt: null,
      cancelledAt: null,
    });
    await db.getRepository(HandoverSession).insert(h);
    // What signForm reads from a request: the signing device and the hand-over it is bound to.
    const req = { ip: '127.0.0.1', get: (name: string) => (name.toLowerCase() === 'user-agent' ? 'Twinframe demo seed' : undefined), session: { handoverId: h.id } } as unknown as Request;
    for (const form of forms) {
      if (opts.stopped?.()) return signed;
      const fresh = await db.getRepository(HandoverSession).findOneByOrFail({ id: h.id });
      await signForm(deps, req, fresh, form.id, {
        answers: unflaggedAnswers(JSON.parse(form.questions) as TemplateQuestion[]),
        channels: form.kind === 'showcase' ? (plan.showcase?.channels ?? []) : [],
        crop: form.kind === 'showcase' ? plan.showcase?.crop : undefined,
        signerName: `${patient.firstName} ${patient.lastName}`,
        signature: await demoSignature(i),
      });
      signed += 1;
    }
  }
  return signed;
}
