import type { ConsentKind } from '../../entities/consent-template.js';
import { CHANNEL_LABELS, formatInZone } from './consent-pdf.js';
import type { ShowcaseChannel } from '../../entities/consent-template.js';

export const KIND_LABELS: Record<ConsentKind, string> = {
  treatment: 'treatment consent',
  photography: 'clinical photography consent',
  showcase: 'showcase consent',
  screening: 'health questionnaire',
};

/** File name of the signed PDF as the patient receives it. */
export function consentFileName(kind: ConsentKind, version: number, signedAt: string): string {
  return `${KIND_LABELS[kind].replace(/\s+/g, '-')}-v${version}-${signedAt.slice(0, 10)}.pdf`;
}

export function signedMail(p: {
  clinicName: string;
  firstName: string;
  title: string;
  kind: ConsentKind;
  version: number;
  signedAt: string;
  timeZone: string;
  recordId: string;
  /** SHA-256 of the attached PDF, exactly the bytes sent. */
  pdfSha256: string;
  verifyUrl: string;
}) {
  const withdrawable = p.kind === 'photography' || p.kind === 'showcase';
  const text = [
    `Dear ${p.firstName},`,
    '',
    `Thank you. Attached is a copy of the form you signed at ${p.clinicName}:`,
    `"${p.title}" (version ${p.version}), signed ${formatInZone(p.signedAt, p.timeZone)}.`,
    '',
    ...(withdrawable
      ? ['You can withdraw this consent at any time, as easily as you gave it: tell reception, phone or reply to this e-mail.', '']
      : []),
    'Please keep this e-mail for your records. If anything in the form is not what you agreed, contact us.',
    '',
    'The PDF carries the clinic\'s digital signature: your PDF reader can show it, and any change to the file breaks it.',
    `You, or anyone you show it to, can check the PDF at ${p.verifyUrl}`,
    '',
    `Record: ${p.recordId}`,
    `SHA-256 of the attached PDF: ${p.pdfSha256}`,
    '',
    p.clinicName,
  ].join('\n');
  return { subject: `Your signed ${KIND_LABELS[p.kind]} from ${p.clinicName}`, text };
}

export function withdrawalMail(p: {
  clinicName: string;
  firstName: string;
  title: string;
  kind: ConsentKind;
  version: number;
  signedAt: string;
  withdrawalDate: string;
  timeZone: string;
  recordId: string;
  channels: ShowcaseChannel[];
}) {
  const after =
    p.kind === 'showcase'
      ? [
          'From now on we will not use your photographs to show our work. We are removing them from our website and social media accounts' +
            (p.channels.length ? ` (you had agreed to: ${p.channels.map((c) => CHANNEL_LABELS[c].toLowerCase()).join(', ')})` : '') +
            '. Printed material already handed out cannot be recalled.',
        ]
      : ['From now on your photographs will not be used for teaching or publication. Photographs already in your clinical record stay there, as the law requires.'];
  const text = [
    `Dear ${p.firstName},`,
    '',
    `We have recorded that you withdrew your ${KIND_LABELS[p.kind]}:`,
    `"${p.title}" (version ${p.version}), which you signed ${formatInZone(p.signedAt, p.timeZone)}.`,
    `The withdrawal applies from ${p.withdrawalDate}.`,
    '',
    ...after,
    'Withdrawing does not affect your care at the clinic or any use before the withdrawal.',
    '',
    `Record: ${p.recordId}`,
    '',
    p.clinicName,
  ].join('\n');
  return { subject: `Withdrawal of your ${KIND_LABELS[p.kind]} is recorded`, text };
}
