import type { EntityManager } from 'typeorm';
import type { TreatmentSettings } from '../../config.js';
import { Reminder, type ReminderKind } from '../../entities/reminder.js';
import { newId, nowIso } from '../../lib/time.js';
import { addDays, addMonths, zonedHourToUtc } from '../../lib/time.js';

export interface DueDate {
  kind: ReminderKind;
  dueOn: string;
  dueAt: string;
}

/**
 * When a treatment's reminders fall due: the review `reviewDays` after the treatment day and maintenance
 * `maintenanceMonths` calendar months after it, each from `reminderHour` o'clock in the clinic's time zone.
 * Maintenance is only planned when filler was used (it is what wears off over months).
 */
export function reminderDueDates(
  treatedOn: string,
  opts: Pick<TreatmentSettings, 'reviewDays' | 'maintenanceMonths' | 'reminderHour'> & { timeZone: string; withMaintenance: boolean },
): DueDate[] {
  const review = addDays(treatedOn, opts.reviewDays);
  const out: DueDate[] = [{ kind: 'review', dueOn: review, dueAt: zonedHourToUtc(review, opts.reminderHour, opts.timeZone) }];
  if (opts.withMaintenance) {
    const maintenance = addMonths(treatedOn, opts.maintenanceMonths);
    out.push({ kind: 'maintenance', dueOn: maintenance, dueAt: zonedHourToUtc(maintenance, opts.reminderHour, opts.timeZone) });
  }
  return out;
}

/**
 * Brings a treatment's reminders in line with its due dates, inside the treatment's transaction: creates missing ones,
 * moves scheduled ones, cancels a scheduled maintenance reminder that no longer applies. Sent reminders and those a person
 * cancelled are history and stay as they are.
 */
export async function syncReminders(
  tx: EntityManager,
  t: { id: string; patientId: string; visitId: string },
  due: DueDate[],
): Promise<Reminder[]> {
  const repo = tx.getRepository(Reminder);
  const existing = await repo.findBy({ treatmentId: t.id });
  for (const r of existing) {
    const d = due.find((x) => x.kind === r.kind);
    if (r.state === 'cancelled' && r.cancelledById === null && d) {
      // Cancelled by an earlier correction, not by a person: it applies again.
      await repo.update({ id: r.id, state: 'cancelled' }, { state: 'scheduled', dueOn: d.dueOn, dueAt: d.dueAt, cancelledAt: null, cancelReason: null });
      continue;
    }
    if (r.state !== 'scheduled') continue;
    if (!d) {
      await repo.update({ id: r.id, state: 'scheduled' }, { state: 'cancelled', cancelledAt: nowIso(), cancelledById: null, cancelReason: 'No longer applies after the treatment record was corrected.' });
    } else if (d.dueAt !== r.dueAt) {
      await repo.update({ id: r.id, state: 'scheduled' }, { dueOn: d.dueOn, dueAt: d.dueAt });
    }
  }
  for (const d of due) {
    if (existing.some((r) => r.kind === d.kind)) continue;
    await repo.insert({
      id: newId(),
      patientId: t.patientId,
      visitId: t.visitId,
      treatmentId: t.id,
      kind: d.kind,
      dueOn: d.dueOn,
      dueAt: d.dueAt,
      state: 'scheduled',
      sentAt: null,
      mailId: null,
      cancelledAt: null,
      cancelledById: null,
      cancelReason: null,
      createdAt: nowIso(),
    });
  }
  return repo.find({ where: { treatmentId: t.id }, order: { dueAt: 'ASC' } });
}
