import type { Request } from 'express';
import { In, type DataSource, type EntityManager } from 'typeorm';
import type { Config } from '../../config.js';
import { Product } from '../../entities/product.js';
import { Reminder } from '../../entities/reminder.js';
import { Treatment, TreatmentDose, TreatmentLine } from '../../entities/treatment.js';
import type { Visit } from '../../entities/visit.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { reminderDueDates, syncReminders } from '../reminders/reminders.service.js';
import { getSettings } from '../settings/settings.service.js';
import { dayIn } from '../../lib/time.js';
import { lotStatus, type LotStatus } from './dates.js';
import { assertScreeningCleared } from './screening.js';
import { lineTotal, toMilli, treatmentTotals, volumeWarnings, type Totals } from './totals.js';
import { ACCEPTED_ZONES_OF_KIND, LIMITS, ZONE_LABELS, type LineKind, type ADVERSE_EVENTS, type TECHNIQUES, type treatmentInputSchema } from './treatments.schemas.js';
import type { z } from 'zod';

type TreatmentInput = z.output<typeof treatmentInputSchema>;

export interface TreatmentWarning {
  code: 'LOT_EXPIRES_SOON' | 'LOT_MISSING' | 'HIGH_VOLUME' | 'NO_SCREENING';
  message: string;
  line?: number;
}

/** A line is refused with the path of the offending field, so the form can point at it. */
const lineError = (i: number, field: string, message: string, code = 'INVALID_LINE') =>
  badRequest(`Line ${i + 1}: ${message}`, [{ path: `lines.${i}.${field}`, message }], code);

/**
 * Checks what zod cannot know without the catalogue: the product exists and is in use, the unit is the product's,
 * the zones belong to its kind, amounts stay within the hard limits, and the lot is not past its expiry on the
 * treatment day. Throws a 400 before anything is written.
 */
export function checkLines(input: TreatmentInput, products: Map<string, Product>, treatedOn: string, allowInactive: Set<string>): void {
  input.lines.forEach((line, i) => {
    const p = products.get(line.productId);
    if (!p) throw lineError(i, 'productId', 'That product is not in the catalogue.', 'UNKNOWN_PRODUCT');
    if (!p.active && !allowInactive.has(p.id)) throw lineError(i, 'productId', `${p.name} is no longer in use in this clinic.`, 'UNKNOWN_PRODUCT');
    if (p.kind === 'hyaluronidase') throw lineError(i, 'productId', `${p.name} is hyaluronidase: record its use in a complication episode of the treatment.`, 'NOT_A_TREATMENT_PRODUCT');
    const kind = p.kind;
    if (line.unit !== p.unit) {
      throw lineError(i, 'unit', `${p.name} is a ${p.kind} measured in ${p.unit}, not ${line.unit}.`, 'UNIT_MISMATCH');
    }
    const allowed = ACCEPTED_ZONES_OF_KIND[kind];
    line.doses.forEach((d, j) => {
      if (!allowed.includes(d.zone)) {
        throw lineError(i, `doses.${j}.zone`, kind === 'filler' ? `Filler goes into the lip and lower-face zones, not ${ZONE_LABELS[d.zone] ?? d.zone}.` : `Neuromodulator is recorded for the depressor anguli oris, mentalis or orbicularis oris, not ${ZONE_LABELS[d.zone] ?? d.zone}.`, 'ZONE_NOT_FOR_PRODUCT');
      }
      const max = p.kind === 'filler' ? LIMITS.fillerPerZoneMl : LIMITS.toxinPerZoneU;
      if (d.amount > max) throw lineError(i, `doses.${j}.amount`, `${d.amount} ${p.unit} in one zone is not plausible (at most ${max} ${p.unit}). Check the amount.`, 'AMOUNT_TOO_LARGE');
    });
    const total = line.doses.reduce((n, d) => n + toMilli(d.amount), 0) / 1000;
    const maxLine = p.kind === 'filler' ? LIMITS.fillerPerLineMl : LIMITS.toxinPerLineU;
    if (total > maxLine) throw lineError(i, 'doses', `${total} ${p.unit} on one line is not plausible (at most ${maxLine} ${p.unit}). Check the amounts.`, 'AMOUNT_TOO_LARGE');
    if (line.expiryDate && lotStatus(line.expiryDate, treatedOn).state === 'expired') {
      throw lineError(i, 'expiryDate', `This lot expired on ${line.expiryDate}, before the treatment day (${treatedOn}). An expired product must not be used.`, 'LOT_EXPIRED');
    }
  });
}

export interface LineView {
  id: string;
  position: number;
  productId: string;
  productName: string;
  manufacturer: string;
  kind: TreatmentLine['kind'];
  unit: TreatmentLine['unit'];
  lotNumber: string | null;
  expiryDate: string | null;
  lot: LotStatus;
  techniques: (typeof TECHNIQUES)[number][];
  device: string | null;
  gauge: number | null;
  depth: string | null;
  notes: string;
  doses: { zone: TreatmentDose['zone']; amount: number }[];
  total: number;
}

export interface TreatmentView {
  id: string;
  visitId: string;
  patientId: string;
  practitionerId: string;
  practitionerName: string | null;
  treatedAt: string;
  treatedOn: string;
  anaesthetic: string;
  anaestheticNotes: string;
  adverseEvents: (typeof ADVERSE_EVENTS)[number][];
  adverseEventNotes: string;
  notes: string;
  lines: LineView[];
  totals: Totals;
  warnings: TreatmentWarning[];
  reminders: Pick<Reminder, 'id' | 'kind' | 'dueOn' | 'dueAt' | 'state' | 'sentAt' | 'cancelledAt' | 'cancelReason'>[];
  createdAt: string;
  updatedAt: string;
}

export async function loadTreatment(db: DataSource | EntityManager, where: { visitId: string } | { id: string }): Promise<Treatment | null> {
  return db.getRepository(Treatment).findOne({
    where,
    relations: { lines: { doses: true }, practitioner: true },
    order: { lines: { position: 'ASC', doses: { zone: 'ASC' } } },
  });
}

/** Warnings of a stored treatment: lots expiring soon or unread, a high session volume. */
export function treatmentWarnings(lines: LineView[], totals: Totals, settings: Config['treatments']): TreatmentWarning[] {
  const out: TreatmentWarning[] = [];
  lines.forEach((l, i) => {
    if (!l.lotNumber) out.push({ code: 'LOT_MISSING', line: i, message: `Line ${i + 1} (${l.productName}) has no lot number yet. Read it from the box for traceability.` });
    if (l.lot.state === 'expires-soon') {
      out.push({
        code: 'LOT_EXPIRES_SOON',
        line: i,
        message: l.lot.daysLeft === 0 ? `Line ${i + 1}: this lot expires on the treatment day.` : `Line ${i + 1}: this lot expires in ${l.lot.daysLeft} ${l.lot.daysLeft === 1 ? 'day' : 'days'} (${l.expiryDate}).`,
      });
    }
    if (l.lot.state === 'missing' && l.lotNumber) out.push({ code: 'LOT_MISSING', line: i, message: `Line ${i + 1} (${l.productName}) has no expiry date yet.` });
  });
  out.push(...volumeWarnings(totals, settings.highVolumeMl));
  return out;
}

export function treatmentView(t: Treatment, reminders: Reminder[], settings: Config['treatments'], extra: TreatmentWarning[] = []): TreatmentView {
  const lines: LineView[] = (t.lines ?? []).map((l) => {
    const doses = l.doses ?? [];
    return {
      id: l.id,
      position: l.position,
      productId: l.productId,
      productName: l.productName,
      manufacturer: l.manufacturer,
      kind: l.kind,
      unit: l.unit,
      lotNumber: l.lotNumber,
      expiryDate: l.expiryDate,
      lot: lotStatus(l.expiryDate, t.treatedOn, settings.lotWarnDays),
      techniques: JSON.parse(l.techniques),
      device: l.device,
      gauge: l.gauge,
      depth: l.depth,
      notes: l.notes,
      doses: doses.map((d) => ({ zone: d.zone, amount: d.amountMilli / 1000 })),
      total: lineTotal({ kind: l.kind, doses }),
    };
  });
  const totals = treatmentTotals((t.lines ?? []).map((l) => ({ kind: l.kind, doses: l.doses ?? [] })));
  return {
    id: t.id,
    visitId: t.visitId,
    patientId: t.patientId,
    practitionerId: t.practitionerId,
    practitionerName: t.practitioner?.name ?? null,
    treatedAt: t.treatedAt,
    treatedOn: t.treatedOn,
    anaesthetic: t.anaesthetic,
    anaestheticNotes: t.anaestheticNotes,
    adverseEvents: JSON.parse(t.adverseEvents),
    adverseEventNotes: t.adverseEventNotes,
    notes: t.notes,
    lines,
    totals,
    warnings: [...treatmentWarnings(lines, totals, settings), ...extra],
    reminders: reminders.map(({ id, kind, dueOn, dueAt, state, sentAt, cancelledAt, cancelReason }) => ({ id, kind, dueOn, dueAt, state, sentAt, cancelledAt, cancelReason })),
    createdAt: t.createdAt,
    updatedAt: t.updatedAt,
  };
}

/**
 * Records (or corrects) the treatment of a visit in one transaction: the screening gate, the line checks, the rows,
 * the reminders and the access-log entry. Nothing is written when any check fails.
 */
export async function saveTreatment(
  db: DataSource,
  req: Request,
  config: Config,
  visit: Visit,
  input: TreatmentInput,
): Promise<{ created: boolean; treatment: Treatment; warnings: TreatmentWarning[] }> {
  if (visit.status === 'cancelled') throw conflict('This visit was cancelled; record the treatment on the visit where it was given.', undefined, 'VISIT_CANCELLED');
  const treatedAt = input.treatedAt ? new Date(input.treatedAt) : new Date();
  if (treatedAt.getTime() > Date.now() + 5 * 60_000) throw badRequest('The treatment time is in the future.', [{ path: 'treatedAt', message: 'Use the time the treatment was given.' }]);
  // The clinic's own settings (admin screen) over the environment's defaults.
  const settings = await getSettings(db, config);
  const treatedOn = dayIn(settings.timeZone, treatedAt);

  return db.transaction(async (tx) => {
    const screening = await assertScreeningCleared(tx, visit.patientId);
    const extra: TreatmentWarning[] = screening
      ? []
      : [{ code: 'NO_SCREENING', message: 'No screening questionnaire is on file for this patient. Ask the patient to complete one at hand-over.' }];

    const existing = await tx.getRepository(Treatment).findOne({ where: { visitId: visit.id }, relations: { lines: true } });
    const products = await tx.getRepository(Product).findBy({ id: In([...new Set(input.lines.map((l) => l.productId))]) });
    const keep = new Set((existing?.lines ?? []).map((l) => l.productId));
    checkLines(input, new Map(products.map((p) => [p.id, p])), treatedOn, keep);
    const byId = new Map(products.map((p) => [p.id, p]));

    const now = nowIso();
    const fields = {
      treatedAt: treatedAt.toISOString(),
      treatedOn,
      anaesthetic: input.anaesthetic,
      anaestheticNotes: input.anaestheticNotes,
      adverseEvents: JSON.stringify(input.adverseEvents),
      adverseEventNotes: input.adverseEventNotes,
      notes: input.notes,
      updatedAt: now,
    };
    let treatmentId: string;
    if (existing) {
      treatmentId = existing.id;
      await tx.getRepository(Treatment).update({ id: existing.id }, { ...fields, practitionerId: req.user!.id });
      await tx.getRepository(TreatmentLine).delete({ treatmentId: existing.id });
    } else {
      treatmentId = newId();
      await tx.getRepository(Treatment).insert({ id: treatmentId, visitId: visit.id, patientId: visit.patientId, practitionerId: req.user!.id, createdAt: now, ...fields });
    }
    // One row per insert: bulk inserts re-assign string ids on SQLite (TypeORM 1.1).
    for (const [position, line] of input.lines.entries()) {
      const p = byId.get(line.productId)!;
      const lineId = newId();
      await tx.getRepository(TreatmentLine).insert({
        id: lineId,
        treatmentId,
        position,
        productId: p.id,
        productName: p.name,
        manufacturer: p.manufacturer,
        // checkLines refused hyaluronidase, so the product is a filler or a toxin.
        kind: p.kind as LineKind,
        unit: p.unit,
        lotNumber: line.lotNumber ?? null,
        expiryDate: line.expiryDate ?? null,
        techniques: JSON.stringify(line.techniques),
        device: line.device ?? null,
        gauge: line.gauge ?? null,
        depth: line.depth ?? null,
        notes: line.notes,
      });
      for (const d of line.doses) await tx.getRepository(TreatmentDose).insert({ id: newId(), lineId, zone: d.zone, amountMilli: toMilli(d.amount) });
    }

    const withMaintenance = input.lines.some((l) => byId.get(l.productId)!.kind === 'filler');
    const due = reminderDueDates(treatedOn, {
      reviewDays: input.reviewAfterDays ?? settings.reviewReminderDays,
      maintenanceMonths: input.maintenanceAfterMonths ?? settings.maintenanceReminderMonths,
      reminderHour: config.treatments.reminderHour,
      timeZone: settings.timeZone,
      withMaintenance,
    });
    await syncReminders(tx, { id: treatmentId, patientId: visit.patientId, visitId: visit.id }, due);

    const saved = (await loadTreatment(tx, { id: treatmentId }))!;
    const totals = treatmentTotals((saved.lines ?? []).map((l) => ({ kind: l.kind, doses: l.doses ?? [] })));
    await audit(tx, req, {
      action: existing ? 'treatment.edit' : 'treatment.create',
      patientId: visit.patientId,
      targetType: 'treatment',
      targetId: treatmentId,
      details: {
        visitId: visit.id,
        lines: (saved.lines ?? []).map((l) => ({ product: l.productName, lot: l.lotNumber, expiry: l.expiryDate, total: lineTotal({ kind: l.kind, doses: l.doses ?? [] }), unit: l.unit })),
        fillerMl: totals.fillerMl,
        toxinU: totals.toxinU,
      },
    });
    return { created: !existing, treatment: saved, warnings: extra };
  });
}
