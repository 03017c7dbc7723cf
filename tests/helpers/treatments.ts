import type { DataSource } from 'typeorm';
import { ConsentRecord } from '../../server/entities/consent-record.js';
import { ConsentTemplate } from '../../server/entities/consent-template.js';
import { Product } from '../../server/entities/product.js';
import { Visit } from '../../server/entities/visit.js';
import { insertDemoTemplates } from '../../server/features/consents/demo-templates.js';
import { newId, nowIso } from '../../server/lib/time.js';
import { createUser, type Client } from './app.js';

/** Invented products: two HA fillers in 1 mL syringes and a neuromodulator in units (FACTS 17, common practice). */
export async function createProducts(admin: Client) {
  const make = async (body: Record<string, unknown>) => {
    const res = await admin.post('/api/products').send(body);
    if (res.status !== 201) throw new Error(`product: ${res.status} ${JSON.stringify(res.body)}`);
    return res.body as Product;
  };
  return {
    soft: await make({ name: 'Test soft HA filler', kind: 'filler', unit: 'mL', manufacturer: 'Testmoor Labs', packSize: 1 }),
    firm: await make({ name: 'Test firm HA filler', kind: 'filler', unit: 'mL', manufacturer: 'Testmoor Labs', packSize: 1 }),
    toxin: await make({ name: 'Test neuromodulator', kind: 'toxin', unit: 'U', unitLabel: 'Testvale units', manufacturer: 'Testvale Pharma', packSize: 100 }),
  };
}

/** A visit booked through the API. */
export async function createVisit(client: Client, patientId: string, practitionerId: string, startsAt = new Date().toISOString(), kind = 'treatment'): Promise<Visit> {
  const res = await client.post(`/api/patients/${patientId}/visits`).send({ startsAt, kind, practitionerId });
  if (res.status !== 201) throw new Error(`visit: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Visit;
}

let screeningTemplate: ConsentTemplate | null = null;

/**
 * A signed screening questionnaire on the demo form, written straight to the table as the hand-over would leave it
 * (the signing flow itself is tested with the consents). `yes` lists the yes-no questions answered "yes".
 */
export async function insertScreening(db: DataSource, patientId: string, yes: string[], signedAt = nowIso()): Promise<ConsentRecord> {
  if (!screeningTemplate || !(await db.getRepository(ConsentTemplate).existsBy({ id: screeningTemplate.id }))) {
    const admin = await createUser(db, 'admin');
    screeningTemplate = (await insertDemoTemplates(db, admin.id, nowIso())).find((t) => t.kind === 'screening')!;
  }
  const questions = JSON.parse(screeningTemplate.questions) as { id: string; type: string; flagWhen?: string[]; options?: string[] }[];
  const answers: Record<string, string> = {};
  for (const q of questions) {
    if (q.type === 'yes-no') answers[q.id] = yes.includes(q.id) ? 'yes' : 'no';
    if (q.type === 'choice') answers[q.id] = q.options![0];
  }
  const flagged = questions.filter((q) => q.flagWhen?.includes(answers[q.id])).map((q) => q.id);
  const id = newId();
  const row = db.getRepository(ConsentRecord).create({
    id,
    patientId,
    templateId: screeningTemplate.id,
    kind: 'screening',
    templateVersion: 1,
    templateSha256: screeningTemplate.sha256!,
    handoverId: null,
    visitId: null,
    answers: JSON.stringify(answers),
    channels: '[]',
    crop: null,
    flaggedQuestionIds: JSON.stringify(flagged),
    signerName: 'Test Patient',
    nameMatchesPatient: true,
    signatureKey: `patients/${patientId}/consents/${id}/signature.png`,
    signatureSha256: '0'.repeat(64),
    pdfKey: `patients/${patientId}/consents/${id}/consent.pdf`,
    pdfSha256: '0'.repeat(64),
    contentSha256: '0'.repeat(64),
    timeZone: 'Europe/London',
    shownAt: signedAt,
    signedAt,
    startedById: null,
    signedIp: null,
    signedUserAgent: null,
    withdrawnAt: null,
    withdrawnById: null,
    withdrawalReason: null,
    withdrawalDate: null,
  });
  await db.transaction((tx) => tx.getRepository(ConsentRecord).insert(row));
  return row;
}

/** Row counts of everything a treatment save writes, to show that a refused request stored nothing. */
export async function treatmentRowCounts(db: DataSource) {
  const count = async (table: string) => Number((await db.query(`SELECT COUNT(*) AS n FROM "${table}"`))[0].n);
  return {
    treatment: await count('treatment'),
    line: await count('treatment_line'),
    dose: await count('treatment_dose'),
    reminder: await count('reminder'),
    audit: Number((await db.query(`SELECT COUNT(*) AS n FROM "audit_event" WHERE "action" LIKE 'treatment.%' AND "action" NOT IN ('treatment.view', 'treatment.list')`))[0].n),
  };
}
