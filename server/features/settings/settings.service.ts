import type { DataSource } from 'typeorm';
import type { Config } from '../../config.js';
import { ClinicSettings } from '../../entities/clinic-settings.js';
import { nowIso } from '../../lib/time.js';

export type Settings = Omit<ClinicSettings, 'id' | 'updatedById'> & { updatedById?: string | null };

/** Defaults when the clinic has not saved settings yet (environment, then trade defaults). */
export function defaultSettings(config: Config): Settings {
  return {
    clinicName: config.clinicName,
    timeZone: config.clinicTimeZone,
    idleMinutes: config.idleMinutes,
    sessionHours: config.sessionHours,
    // Review 2–4 weeks after filler, maintenance around 6 months (filler lasts about 6–9 months): common practice.
    reviewReminderDays: config.treatments.reviewDays,
    maintenanceReminderMonths: config.treatments.maintenanceMonths,
    // A common minimum for adult clinical records; the screen defers to local law and professional guidance.
    retentionYears: 8,
    watermarkText: config.clinicName,
    showcaseCaption: 'Individual results vary.',
    complicationProtocol: '',
    prescriberRequired: false,
    treatmentCardEmail: false,
    // Neuromodulator lasts about 3–4 months (FACTS 28, common practice).
    toxinMaintenanceMonths: 3,
    updatedAt: '',
  };
}

const CACHE_MS = 5_000;
const cache = new WeakMap<DataSource, { at: number; value: Settings }>();

/**
 * The clinic's settings. Read through a short cache (per database) so hot paths can call it on each request;
 * every instance sees a change within a few seconds, with no shared in-process state needed.
 */
export async function getSettings(db: DataSource, config: Config): Promise<Settings> {
  const hit = cache.get(db);
  if (hit && Date.now() - hit.at < CACHE_MS) return hit.value;
  const row = await db.getRepository(ClinicSettings).findOneBy({ id: 'clinic' });
  const value: Settings = row ? (({ id: _id, ...rest }) => rest)(row) : defaultSettings(config);
  cache.set(db, { at: Date.now(), value });
  return value;
}

export async function saveSettings(db: DataSource, config: Config, patch: Partial<Settings>, userId: string): Promise<Settings> {
  const current = await getSettings(db, config);
  const next = { ...current, ...patch, updatedAt: nowIso(), updatedById: userId };
  await db.getRepository(ClinicSettings).save({ id: 'clinic', ...next });
  cache.delete(db);
  return next;
}
