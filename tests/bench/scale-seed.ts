/**
 * Grows a Twinframe SQLite file to a clinic group's size for `npm run bench:scale`: 50,000 patients, 200,000 photo
 * rows (25,000 visits × 8 views, one patient with 50 visits × 8), the treatments of the treatment visits with their
 * lines, doses and reminders, today's clinic day, and 1,000,000 access-log rows spread over three years.
 *
 * How: every row is a copy of a row the real app wrote (the demo clinic's, and one patient's 8 photos uploaded
 * through the API with automatic landmarks and alignment), with new ids, people, times and foreign keys. Copies are
 * inserted with better-sqlite3 prepared statements (one statement per table, every column of the table as it is now,
 * so columns added by later migrations are copied too) inside one transaction per table, with a 512 MB page cache;
 * the database's own triggers (search index, append-only checks) fire on every row as they would in use.
 */
import { randomUUID } from 'node:crypto';
import Database from 'better-sqlite3';
import { CHAINS, linkHash, rowHashOf } from '../../server/features/integrity/chain.js';

export interface ScaleSize {
  patients: number;
  /** Photo rows, 8 per visit. */
  photos: number;
  auditRows: number;
  /** Visits of the one long-history patient (8 photos each, part of `photos`). */
  timelineVisits: number;
  /** Visits today, spread over the practitioners (part of `photos` for those begun). */
  todayVisits: number;
}

export const FULL_SIZE: ScaleSize = { patients: 50_000, photos: 200_000, auditRows: 1_000_000, timelineVisits: 50, todayVisits: 40 };

export interface SeedResult {
  counts: Record<string, number>;
  ms: Record<string, number>;
  /** The long-history patient (50 visits × 8 views). */
  timelinePatientId: string;
  /** Patients to look up, search for and filter the access log by (seeded, not demo). */
  sample: { id: string; firstName: string; lastName: string; dateOfBirth: string; code: string }[];
  today: string;
}

type Row = Record<string, unknown>;

/** mulberry32: a small deterministic PRNG, so every run seeds the same people. */
function prng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

// Invented name parts; combined they give tens of thousands of distinct, made-up names.
const FIRST_A = ['Al', 'Bri', 'Ca', 'Da', 'El', 'Fa', 'Gi', 'Ha', 'Ilo', 'Ja', 'Ke', 'Li', 'Ma', 'Ne', 'Or', 'Pe', 'Qui', 'Ro', 'Sa', 'Te', 'Ula', 'Ve', 'Wi', 'Ya', 'Zo'];
const FIRST_B = ['ra', 'na', 'lia', 'ssa', 'dra', 'mi', 'ne', 'ly', 'rin', 'sha', 'ta', 'wen', 'va', 'ka', 'bel', 'die'];
const LAST_A = ['Ash', 'Bram', 'Cor', 'Dun', 'Ell', 'Fen', 'Gar', 'Hol', 'Iver', 'Jes', 'Kel', 'Lang', 'Mar', 'Nor', 'Ost', 'Pell', 'Quen', 'Rad', 'Sel', 'Thorn', 'Ulv', 'Vane', 'Wex', 'Yar', 'Zell', 'Kovač', 'Łęcz', 'Nyg'];
const LAST_B = ['ford', 'wick', 'more', 'by', 'ton', 'well', 'ridge', 'stead', 'holm', 'ley', 'combe', 'hurst', 'dale', 'ski', 'ová', 'berg', 'mark', 'gate', 'wood', 'shaw'];

const ACTIONS: [string, number][] = [
  ['photo.view', 38],
  ['patient.view', 20],
  ['timeline.view', 10],
  ['compare.view', 9],
  ['auth.login', 6],
  ['treatment.view', 5],
  ['measurements.view', 4],
  ['photo.upload', 4],
  ['visit.create', 2],
  ['consent.view', 2],
];
const ACTION_TOTAL = ACTIONS.reduce((a, [, w]) => a + w, 0);

const DAY = 86_400_000;

/** One prepared INSERT of every current column of `table`; `copy(template, overrides)` writes one row. */
function copier(db: Database.Database, table: string) {
  const cols = (db.prepare(`PRAGMA table_info("${table}")`).all() as { name: string }[]).map((c) => c.name);
  const stmt = db.prepare(`INSERT INTO "${table}" (${cols.map((c) => `"${c}"`).join(', ')}) VALUES (${cols.map((c) => `@${c}`).join(', ')})`);
  return (template: Row, overrides: Row) => {
    const row: Row = {};
    for (const c of cols) row[c] = c in overrides ? overrides[c] : (template[c] ?? null);
    stmt.run(row);
  };
}

const all = (db: Database.Database, sql: string, ...params: unknown[]) => db.prepare(sql).all(...params) as Row[];
const one = (db: Database.Database, sql: string, ...params: unknown[]) => db.prepare(sql).get(...params) as Row | undefined;

/** The clinic's calendar day (YYYY-MM-DD) of an instant. */
const dayIn = (t: Date, timeZone: string) => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(t);

/**
 * Seeds the scale data into `file`, which already holds the demo clinic and one patient (`templatePatientId`) with one
 * visit whose 8 photos went through the real upload path.
 */
export function seedScale(file: string, size: ScaleSize, o: { templatePatientId: string; timeZone: string; now?: Date }): SeedResult {
  const db = new Database(file);
  db.pragma('journal_mode = WAL');
  db.pragma('foreign_keys = ON');
  // Bench data, written once: a large page cache keeps the random-key index inserts in memory, and no fsync per
  // transaction (a crash mid-seed just means seeding again).
  db.pragma('cache_size = -524288');
  db.pragma('synchronous = OFF');
  const rnd = prng(20);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(rnd() * xs.length)];
  const now = o.now ?? new Date();
  const nowMs = now.getTime();
  const counts: Record<string, number> = {};
  const ms: Record<string, number> = {};
  const timed = (name: string, fn: () => number) => {
    const t0 = performance.now();
    counts[name] = db.transaction(fn)();
    ms[name] = performance.now() - t0;
  };

  const tPatient = one(db, `SELECT * FROM "patient" WHERE "id" = ?`, o.templatePatientId)!;
  const tVisit = one(db, `SELECT * FROM "visit" WHERE "patientId" = ? LIMIT 1`, o.templatePatientId)!;
  const tPhotos = all(db, `SELECT * FROM "photo" WHERE "visitId" = ? AND "state" = 'captured'`, tVisit.id);
  if (tPhotos.length !== 8) throw new Error(`the template visit has ${tPhotos.length} photos, not 8`);
  const tTreatment = one(db, `SELECT t.* FROM "treatment" t WHERE EXISTS (SELECT 1 FROM "reminder" r WHERE r."treatmentId" = t."id") LIMIT 1`)!;
  const tLines = all(db, `SELECT * FROM "treatment_line" WHERE "treatmentId" = ?`, tTreatment.id);
  const tDoses = all(db, `SELECT * FROM "treatment_dose" WHERE "lineId" IN (${tLines.map(() => '?').join(',')})`, ...tLines.map((l) => l.id));
  const tReminders = all(db, `SELECT * FROM "reminder" WHERE "treatmentId" = ?`, tTreatment.id);
  const tSent = one(db, `SELECT * FROM "reminder" WHERE "state" = 'sent' LIMIT 1`);
  const tAudit = one(db, `SELECT * FROM "audit_event" WHERE "patientId" IS NOT NULL LIMIT 1`) ?? one(db, `SELECT * FROM "audit_event" LIMIT 1`)!;
  const users = all(db, `SELECT "id", "role" FROM "user"`);
  const practitioners = users.filter((u) => u.role === 'practitioner').map((u) => u.id as string);
  const prefix = String(tPatient.code).split('-')[0];
  const firstCode = Number(one(db, `SELECT count(*) AS n FROM "patient"`)!.n) + 1;

  const copyPatient = copier(db, 'patient');
  const copyVisit = copier(db, 'visit');
  const copyPhoto = copier(db, 'photo');
  const copyTreatment = copier(db, 'treatment');
  const copyLine = copier(db, 'treatment_line');
  const copyDose = copier(db, 'treatment_dose');
  const copyReminder = copier(db, 'reminder');
  const copyAudit = copier(db, 'audit_event');

  const patients: SeedResult['sample'] = [];
  timed('patient', () => {
    for (let i = 0; i < size.patients - firstCode + 1; i++) {
      const firstName = pick(FIRST_A) + pick(FIRST_B);
      const lastName = pick(LAST_A) + pick(LAST_B) + (rnd() < 0.1 ? `-${pick(LAST_A)}${pick(LAST_B)}` : '');
      const y = 1950 + Math.floor(rnd() * 55);
      const dateOfBirth = `${y}-${String(1 + Math.floor(rnd() * 12)).padStart(2, '0')}-${String(1 + Math.floor(rnd() * 28)).padStart(2, '0')}`;
      const code = `${prefix}-${String(firstCode + i).padStart(4, '0')}`;
      const created = new Date(nowMs - rnd() * 3 * 365 * DAY).toISOString();
      const p = { id: randomUUID(), firstName, lastName, dateOfBirth, code };
      copyPatient(tPatient, {
        ...p,
        email: `${firstName}.${lastName}.${i}@mail.example`.toLowerCase(),
        phone: `+44 7700 ${String(900000 + (i % 100000)).padStart(6, '0')}`,
        archived: rnd() < 0.03 ? 1 : 0,
        lipRatioTarget: null,
        createdAt: created,
        updatedAt: created,
      });
      patients.push(p);
    }
    return patients.length;
  });

  // Visits: the long-history patient first, then today's clinic day, then two visits each for as many patients as
  // the photo count needs. Every begun visit gets its 8 photos.
  const timelinePatient = patients[0];
  const today = dayIn(now, o.timeZone);
  type PlannedVisit = { id: string; patientId: string; startsAt: string; kind: string; status: string; photos: boolean };
  const planned: PlannedVisit[] = [];
  const first = nowMs - (size.timelineVisits * 14 + 7) * DAY;
  for (let i = 0; i < size.timelineVisits; i++) {
    planned.push({ id: randomUUID(), patientId: timelinePatient.id, startsAt: new Date(first + i * 14 * DAY).toISOString(), kind: i === 0 ? 'consultation' : i % 2 ? 'treatment' : 'review', status: 'completed', photos: true });
  }
  for (let i = 0; i < size.todayVisits; i++) {
    // 10:00–16:45 UTC is inside the clinic's day in any European zone.
    const at = new Date(`${today}T${String(10 + Math.floor(i / 6)).padStart(2, '0')}:${String((i % 6) * 10).padStart(2, '0')}:00.000Z`).toISOString();
    const status = i < size.todayVisits * 0.4 ? 'completed' : i < size.todayVisits * 0.6 ? 'in-progress' : 'booked';
    planned.push({ id: randomUUID(), patientId: patients[1 + i].id, startsAt: at, kind: ['consultation', 'treatment', 'review'][i % 3], status, photos: status !== 'booked' });
  }
  let k = 1 + size.todayVisits;
  let withPhotos = planned.filter((v) => v.photos).length;
  while (withPhotos * 8 < size.photos) {
    const p = patients[k++ % patients.length];
    const t0 = nowMs - (30 + rnd() * 3 * 365) * DAY;
    for (const [j, kind] of (['treatment', 'review'] as const).entries()) {
      if (withPhotos * 8 >= size.photos) break;
      planned.push({ id: randomUUID(), patientId: p.id, startsAt: new Date(t0 + j * 14 * DAY).toISOString(), kind, status: 'completed', photos: true });
      withPhotos++;
    }
  }
  timed('visit', () => {
    for (const [i, v] of planned.entries()) {
      copyVisit(tVisit, { id: v.id, patientId: v.patientId, practitionerId: practitioners[i % practitioners.length], startsAt: v.startsAt, kind: v.kind, status: v.status, notes: '', createdAt: v.startsAt, updatedAt: v.startsAt });
    }
    return planned.length;
  });

  // Each copy keeps the template's landmarks, alignment and measurements, with the storage keys of its own ids.
  timed('photo', () => {
    let n = 0;
    for (const v of planned) {
      if (!v.photos) continue;
      for (const t of tPhotos) {
        const id = randomUUID();
        const variants = String(t.variants).replaceAll(String(t.patientId), v.patientId).replaceAll(String(t.visitId), v.id).replaceAll(String(t.id), id);
        const hex = id.replaceAll('-', '');
        copyPhoto(t, { id, patientId: v.patientId, visitId: v.id, variants, capturedAt: v.startsAt, uploadedAt: v.startsAt, sha256: hex + hex, sourceSha256: hex + hex });
        n++;
      }
    }
    return n;
  });

  timed('treatment', () => {
    let n = 0;
    for (const [i, v] of planned.entries()) {
      if (v.kind !== 'treatment' || v.status !== 'completed') continue;
      const treatmentId = randomUUID();
      copyTreatment(tTreatment, { id: treatmentId, visitId: v.id, patientId: v.patientId, practitionerId: practitioners[i % practitioners.length], treatedAt: v.startsAt, treatedOn: v.startsAt.slice(0, 10), createdAt: v.startsAt, updatedAt: v.startsAt });
      for (const l of tLines) {
        const lineId = randomUUID();
        copyLine(l, { id: lineId, treatmentId });
        for (const d of tDoses.filter((x) => x.lineId === l.id)) copyDose(d, { id: randomUUID(), lineId });
      }
      for (const r of tReminders) {
        const offset = Date.parse(String(r.dueAt)) - Date.parse(String(tTreatment.treatedAt));
        const dueAt = new Date(Date.parse(v.startsAt) + offset).toISOString();
        // Reminders already due were sent (as the demo clinic's are); later ones wait for their day.
        const sent = dueAt.slice(0, 10) <= today && tSent;
        copyReminder(sent ? tSent : r, { id: randomUUID(), kind: r.kind, patientId: v.patientId, visitId: v.id, treatmentId, dueAt, dueOn: dueAt.slice(0, 10), createdAt: v.startsAt, ...(sent ? {} : { state: 'scheduled', sentAt: null, mailId: null }) });
      }
      n++;
    }
    return n;
  });

  // The access log, oldest first as it is written: three years of staff activity, a tenth of it on the long-history
  // patient's record.
  // Each row is appended to the access log's hash chain as the app appends it (its seq, the previous link, its hash).
  timed('audit_event', () => {
    const span = 3 * 365 * DAY;
    const step = span / size.auditRows;
    const head = one(db, `SELECT "seq", "hash" FROM "chain_head" WHERE "chain" = ?`, CHAINS.access.name)!;
    let seq = Number(head.seq);
    let prev = String(head.hash);
    for (let i = 0; i < size.auditRows; i++) {
      let r = rnd() * ACTION_TOTAL;
      const action = ACTIONS.find(([, w]) => (r -= w) < 0)![0];
      const patientId = action === 'auth.login' ? null : rnd() < 0.002 ? timelinePatient.id : patients[Math.floor(rnd() * patients.length)].id;
      const actor = users[Math.floor(rnd() * users.length)];
      const row: Row = {
        ...tAudit,
        id: randomUUID(),
        at: new Date(nowMs - span + i * step).toISOString(),
        actorId: actor.id,
        actorRole: actor.role,
        action,
        patientId,
        targetType: patientId ? (action.startsWith('photo') ? 'photo' : 'patient') : null,
        targetId: patientId ? (action.startsWith('photo') ? randomUUID() : patientId) : null,
        ip: `10.0.${Math.floor(rnd() * 4)}.${10 + Math.floor(rnd() * 40)}`,
        userAgent: 'Mozilla/5.0 (iPad; CPU OS 17_4 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.4 Mobile/15E148 Safari/604.1',
        details: action === 'photo.view' ? '{"variant":"display","format":"webp"}' : '{}',
      };
      seq += 1;
      const rowHash = rowHashOf(CHAINS.access, seq, row);
      copyAudit(row, { chainSeq: seq, prevHash: prev, rowHash });
      prev = linkHash(prev, rowHash);
    }
    db.prepare(`UPDATE "chain_head" SET "seq" = ?, "hash" = ?, "updatedAt" = ? WHERE "chain" = ?`).run(seq, prev, now.toISOString(), CHAINS.access.name);
    return size.auditRows;
  });

  db.pragma('wal_checkpoint(TRUNCATE)');
  db.close();
  return { counts, ms, timelinePatientId: timelinePatient.id, sample: patients.slice(200, 2200), today };
}
