/** The e-mail that carries a comparison sheet to the patient: short, no measurements in the body, the PDF attached. */
export function sheetMail(p: { clinicName: string; firstName: string }) {
  const text = [
    `Dear ${p.firstName},`,
    '',
    `Attached is the comparison sheet of your photos from ${p.clinicName}, for your own record.`,
    '',
    'Results vary from person to person and change over time. The measurements on the sheet are guides for discussion, not treatment targets.',
    'If you have any questions, reply to this e-mail or ask at your next visit.',
    '',
    p.clinicName,
  ].join('\n');
  return { subject: `Your comparison sheet from ${p.clinicName}`, text };
}
