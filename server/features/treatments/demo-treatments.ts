import type { EntityManager } from 'typeorm';
import type { Config } from '../../config.js';
import { MailLog } from '../../entities/mail-log.js';
import { Patient } from '../../entities/patient.js';
import type { Product } from '../../entities/product.js';
import { Reminder } from '../../entities/reminder.js';
import { Treatment, TreatmentDose, TreatmentLine } from '../../entities/treatment.js';
import type { Visit } from '../../entities/visit.js';
import { newId } from '../../lib/time.js';
import { reminderDueDates } from '../reminders/reminders.service.js';
import { addMonths, dayIn } from '../../lib/time.js';
import type { LineKind, ZoneKey } from './treatments.schemas.js';

/** Invented first sessions and top-ups (mL per zone), all within the usual 0.5–1.5 mL per session (FACTS 17, common practice). */
const FIRST: [ZoneKey, number][][] = [
  [['upper-body-right', 0.15], ['upper-body-left', 0.15], ['lower-body-right', 0.2], ['lower-body-left', 0.2], ['cupids-bow', 0.1], ['upper-vermilion-border-right', 0.1], ['upper-vermilion-border-left', 0.1]],
  [['upper-body-right', 0.1], ['upper-body-left', 0.1], ['lower-body-right', 0.15], ['lower-body-left', 0.15], ['wet-dry-border-upper', 0.1], ['oral-commissure-right', 0.1], ['oral-commissure-left', 0.1]],
  [['upper-vermilion-border-right', 0.1], ['upper-vermilion-border-left', 0.1], ['lower-vermilion-border-right', 0.05], ['lower-vermilion-border-left', 0.05], ['philtral-column-right', 0.05], ['philtral-column-left', 0.05], ['upper-body-right', 0.1], ['upper-body-left', 0.1]],
  [['chin', 0.5], ['marionette-right', 0.2], ['marionette-left', 0.2], ['lower-body-right', 0.1], ['lower-body-left', 0.1]],
];
const TOP_UP: [ZoneKey, number][] = [['upper-body-right', 0.1], ['upper-body-left', 0.1], ['lower-body-right', 0.1], ['lower-body-left', 0.1], ['cupids-bow', 0.1]];

const lotFor = (i: number) => `LR${String(24_000 + i * 37).padStart(6, '0')}`;

/**
 * Treatment records for the demo clinic's past treatment visits, with their reminders: those already due are shown
 * as sent (with the outbox row that carried them), later ones as scheduled.
 */
export async function insertDemoTreatments(tx: EntityManager, input: { visits: Partial<Visit>[]; products: Product[]; config: Config; now: Date }): Promise<void> {
  const fillers = input.products.filter((p) => p.kind === 'filler');
  const toxin = input.products.find((p) => p.kind === 'toxin');
  const tz = input.config.clinicTimeZone;
  const past = input.visits.filter((v) => v.kind === 'treatment' && v.status === 'completed' && Date.parse(v.startsAt!) < input.now.getTime());
  const seenPatients = new Map<string, number>();
  for (const [i, v] of past.entries()) {
    const nth = seenPatients.get(v.patientId!) ?? 0;
    seenPatients.set(v.patientId!, nth + 1);
    const treatedAt = new Date(Date.parse(v.startsAt!) + 15 * 60_000).toISOString();
    const treatedOn = dayIn(tz, treatedAt);
    const id = newId();
    await tx.getRepository(Treatment).insert({
      id,
      visitId: v.id!,
      patientId: v.patientId!,
      practitionerId: v.practitionerId!,
      treatedAt,
      treatedOn,
      anaesthetic: i % 2 ? 'lidocaine-in-product' : 'topical',
      anaestheticNotes: '',
      adverseEvents: JSON.stringify(i % 3 === 0 ? ['swelling'] : []),
      adverseEventNotes: i % 3 === 0 ? 'Mild swelling, settled before leaving.' : '',
      notes: nth === 0 ? 'First lip treatment; patient happy with the plan.' : 'Top-up as planned at the consultation.',
      createdAt: treatedAt,
      updatedAt: treatedAt,
    });
    const product = fillers[i % fillers.length];
    const lines: { product: Product; kind: LineKind; doses: [ZoneKey, number][]; techniques: string[]; depth: string; device: string; gauge: number }[] = [
      { product, kind: 'filler', doses: nth === 0 ? FIRST[i % FIRST.length] : TOP_UP, techniques: ['linear-threading', 'serial-puncture'], depth: 'submucosal', device: 'needle', gauge: 30 },
    ];
    if (toxin && i % 4 === 1) lines.push({ product: toxin, kind: 'toxin', doses: [['dao-right', 3], ['dao-left', 3]], techniques: ['bolus'], depth: 'intramuscular', device: 'needle', gauge: 32 });
    for (const [position, l] of lines.entries()) {
      const lineId = newId();
      await tx.getRepository(TreatmentLine).insert({
        id: lineId,
        treatmentId: id,
        position,
        productId: l.product.id,
        productName: l.product.name,
        manufacturer: l.product.manufacturer,
        kind: l.kind,
        unit: l.product.unit,
        lotNumber: lotFor(i * 2 + position),
        expiryDate: addMonths(treatedOn, 14),
        techniques: JSON.stringify(l.techniques),
        device: l.device,
        gauge: l.gauge,
        depth: l.depth,
        notes: '',
      });
      for (const [zone, amount] of l.doses) await tx.getRepository(TreatmentDose).insert({ id: newId(), lineId, zone, amountMilli: Math.round(amount * 1000) });
    }
    const due = reminderDueDates(treatedOn, { ...input.config.treatments, timeZone: tz, withMaintenance: true });
    for (const d of due) {
      const sent = Date.parse(d.dueAt) <= input.now.getTime();
      let mailId: string | null = null;
      if (sent) {
        const to = (await tx.getRepository(Patient).findOneBy({ id: v.patientId! }))?.email ?? 'patient@mail.example';
        mailId = newId();
        await tx.getRepository(MailLog).insert({
          id: mailId,
          to,
          subject: d.kind === 'review' ? `Time for your review at ${input.config.clinicName}` : `Planning your next appointment at ${input.config.clinicName}`,
          text: '(demo reminder)',
          html: null,
          attachments: '[]',
          state: 'sent',
          attempts: 1,
          nextAttemptAt: d.dueAt,
          claimToken: null,
          claimedUntil: null,
          sentAt: d.dueAt,
          messageId: `<${mailId}@twinframe.invalid>`,
          lastError: null,
          relatedType: 'reminder',
          relatedId: null,
          patientId: v.patientId!,
          createdAt: d.dueAt,
        });
      }
      const reminderId = newId();
      await tx.getRepository(Reminder).insert({
        id: reminderId,
        patientId: v.patientId!,
        visitId: v.id!,
        treatmentId: id,
        kind: d.kind,
        dueOn: d.dueOn,
        dueAt: d.dueAt,
        state: sent ? 'sent' : 'scheduled',
        sentAt: sent ? d.dueAt : null,
        mailId,
        cancelledAt: null,
        cancelledById: null,
        cancelReason: null,
        createdAt: treatedAt,
      });
      if (mailId) await tx.getRepository(MailLog).update({ id: mailId }, { relatedId: reminderId });
    }
  }
}
