import type { Patient } from '../../entities/patient.js';
import type { ReminderKind } from '../../entities/reminder.js';

/**
 * The reminder e-mail. It names the clinic, the patient and the treatment date only: no product, amounts or
 * other clinical detail leaves the clinic by e-mail.
 */
export function reminderMail(input: { kind: ReminderKind; patient: Pick<Patient, 'firstName'>; clinicName: string; treatedOn: string; dueOn: string }) {
  const fmt = (day: string) => new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });
  const treated = fmt(input.treatedOn);
  const worries =
    'If anything about the treated area worries you (for example pain that gets worse, a change in skin colour, or a change in your vision), contact the clinic straight away, and in an emergency call your local emergency number.';
  if (input.kind === 'review') {
    return {
      subject: `Time for your review at ${input.clinicName}`,
      text: [
        `Dear ${input.patient.firstName},`,
        '',
        `After your treatment on ${treated}, we would like to see you for a short review, usually two to four weeks afterwards. We will look at how the result has settled and take photos from the same angles as before, so we can compare them with you.`,
        '',
        'Please contact the clinic to book your review if you have not already done so.',
        '',
        worries,
        '',
        `With best wishes,`,
        input.clinicName,
      ].join('\n'),
    };
  }
  return {
    subject: `Planning your next appointment at ${input.clinicName}`,
    text: [
      `Dear ${input.patient.firstName},`,
      '',
      `It is now some months since your treatment on ${treated}. Lip filler gradually softens over time, so this is a good moment to talk about whether and when you would like a maintenance appointment. There is no obligation: we are happy to advise.`,
      '',
      'Please contact the clinic if you would like to book a consultation.',
      '',
      `With best wishes,`,
      input.clinicName,
    ].join('\n'),
  };
}
