/** The only place object keys are built (DESIGN §5). Every part is checked so no key can escape its prefix. */

const SAFE_ID = /^[A-Za-z0-9][A-Za-z0-9_-]{0,63}$/;
const SAFE_NAME = /^[a-z0-9][a-z0-9_-]{0,31}$/;
const SAFE_EXT = /^[a-z0-9]{1,5}$/;

function part(value: string, what: string, pattern = SAFE_ID): string {
  if (!pattern.test(value) || value.includes('..')) throw new Error(`Unsafe ${what} in object key: ${JSON.stringify(value)}`);
  return value;
}

/** `patients/{patientId}/visits/{visitId}/{photoId}/{variant}.{ext}` */
export function photoKey(p: { patientId: string; visitId: string; photoId: string; variant: string; ext: string }): string {
  return [
    'patients',
    part(p.patientId, 'patient id'),
    'visits',
    part(p.visitId, 'visit id'),
    part(p.photoId, 'photo id'),
    `${part(p.variant, 'variant', SAFE_NAME)}.${part(p.ext, 'extension', SAFE_EXT)}`,
  ].join('/');
}

/** `patients/{patientId}/{area}/{id}/{name}.{ext}` for documents kept with a patient (consent PDFs, signatures, sheets, exports). */
export function patientDocumentKey(p: { patientId: string; area: string; id: string; name: string; ext: string }): string {
  return [
    'patients',
    part(p.patientId, 'patient id'),
    part(p.area, 'area', SAFE_NAME),
    part(p.id, 'document id'),
    `${part(p.name, 'name', SAFE_NAME)}.${part(p.ext, 'extension', SAFE_EXT)}`,
  ].join('/');
}

/** The prefix holding everything of one patient (for data export and erasure). */
export function patientPrefix(patientId: string): string {
  return `patients/${part(patientId, 'patient id')}/`;
}
