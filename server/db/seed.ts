import type { DataSource } from 'typeorm';
import { hashPassword } from '../auth/passwords.js';
import { insertDemoTemplates } from '../features/consents/demo-templates.js';
import { insertDemoStock } from '../features/stock/demo-stock.js';
import { insertDemoProducts } from '../features/treatments/demo-products.js';
import { insertDemoTreatments } from '../features/treatments/demo-treatments.js';
import { loadConfig } from '../config.js';
import { Patient } from '../entities/patient.js';
import { User, type Role } from '../entities/user.js';
import { Visit, type VisitKind, type VisitStatus } from '../entities/visit.js';
import { dayIn, newId, nowIso } from '../lib/time.js';

/** Demo sign-ins, printed at start in demo mode. All people and the clinic are invented. */
export const DEMO_USERS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'admin@linden-row.example', name: 'Maren Holloway', role: 'admin', password: 'linden-admin-demo' },
  { email: 'ines@linden-row.example', name: 'Ines Varga, RN', role: 'practitioner', password: 'linden-inject-demo' },
  { email: 'tomas@linden-row.example', name: 'Dr Tomas Reyel', role: 'practitioner', password: 'linden-inject-demo' },
  { email: 'desk@linden-row.example', name: 'Priya Lindqvist', role: 'coordinator', password: 'linden-desk-demo' },
];

const DEMO_PATIENTS = [
  ['Aurelie', 'Fenwick', '1991-04-12', 'aurelie.fenwick@mail.example', '+44 7700 900101'],
  ['Bianca', 'Oduya', '1988-09-30', 'bianca.oduya@mail.example', '+44 7700 900102'],
  ['Carys', 'Mallender', '1995-01-08', 'carys.m@mail.example', '+44 7700 900103'],
  ['Dalia', 'Kovařík', '1986-06-21', 'dalia.kovarik@mail.example', '+44 7700 900104'],
  ['Elodie', 'Marchetti', '1993-11-02', 'elodie.marchetti@mail.example', '+44 7700 900105'],
  ['Freya', 'Ashcombe', '1979-03-17', 'freya.ashcombe@mail.example', '+44 7700 900106'],
  ['Greta', 'Nyström', '1990-07-25', 'greta.nystrom@mail.example', '+44 7700 900107'],
  ['Hana', 'Petrosyan', '1998-12-14', 'hana.petrosyan@mail.example', '+44 7700 900108'],
  ['Isolde', 'Quarry', '1984-05-05', 'isolde.quarry@mail.example', '+44 7700 900109'],
  ['Jasmin', 'Tallow', '1992-02-28', 'jasmin.tallow@mail.example', '+44 7700 900110'],
  ['Kiri', 'Whitlock', '1987-08-19', 'kiri.whitlock@mail.example', '+44 7700 900111'],
  ['Zoë', 'Łukasiewicz-Řezníčková', '1994-10-09', 'zoe.lr@mail.example', '+44 7700 900112'],
] as const;

const DAY = 86_400_000;

/** A visit history: consultation, treatment, review at 2 weeks, a later top-up, its review. Day offsets from now. */
function historyFor(index: number): { offsetDays: number; kind: VisitKind }[] {
  const start = 330 - index * 22;
  const plan: { offsetDays: number; kind: VisitKind }[] = [
    { offsetDays: -start, kind: 'consultation' },
    { offsetDays: -start + 7, kind: 'treatment' },
    { offsetDays: -start + 21, kind: 'review' },
  ];
  if (start > 150) {
    plan.push({ offsetDays: -start + 120, kind: 'treatment' }, { offsetDays: -start + 134, kind: 'review' });
  }
  return plan;
}

function atHour(offsetDays: number, hour: number, minute = 0): string {
  const d = new Date(Date.now() + offsetDays * DAY);
  d.setUTCHours(hour, minute, 0, 0);
  return d.toISOString();
}

/** Seeds the invented demo clinic once. Returns false when the database already holds users. */
export async function seedDemo(db: DataSource): Promise<boolean> {
  if ((await db.getRepository(User).count()) > 0) return false;
  const now = nowIso();
  await db.transaction(async (tx) => {
    const users = [];
    for (const u of DEMO_USERS) {
      users.push({ id: newId(), email: u.email, name: u.name, role: u.role, passwordHash: await hashPassword(u.password), active: true, createdAt: now, updatedAt: now });
    }
    // One row per insert: a bulk insert on SQLite re-assigns the objects' string ids afterwards (TypeORM 1.1).
    for (const u of users) await tx.getRepository(User).insert(u);
    const practitioners = users.filter((u) => u.role === 'practitioner');
    await insertDemoTemplates(tx, users.find((u) => u.role === 'admin')!.id, now);
    const products = await insertDemoProducts(tx, now);

    const patients = DEMO_PATIENTS.map(([firstName, lastName, dateOfBirth, email, phone], i) => ({
      id: newId(),
      code: `LR-${String(i + 1).padStart(4, '0')}`,
      firstName,
      lastName,
      dateOfBirth,
      email,
      phone,
      archived: false,
      createdAt: now,
      updatedAt: now,
    }));
    for (const p of patients) await tx.getRepository(Patient).insert(p);

    const visits: Partial<Visit>[] = [];
    patients.forEach((p, i) => {
      const practitioner = practitioners[i % practitioners.length];
      for (const h of historyFor(i)) {
        if (h.offsetDays >= 0) continue;
        visits.push({ id: newId(), patientId: p.id, practitionerId: practitioner.id, startsAt: atHour(h.offsetDays, 9 + (i % 7), i % 2 ? 30 : 0), kind: h.kind, status: 'completed', notes: '', createdAt: now, updatedAt: now });
      }
    });
    // Today's clinic day: a mix of kinds across both practitioners.
    const today: [number, VisitKind, VisitStatus, number, number][] = [
      [0, 'review', 'completed', 9, 0],
      [3, 'treatment', 'in-progress', 10, 30],
      [5, 'consultation', 'booked', 12, 0],
      [8, 'treatment', 'booked', 14, 0],
      [10, 'review', 'booked', 15, 30],
      [11, 'consultation', 'booked', 16, 30],
    ];
    today.forEach(([pi, kind, status, hour, minute], k) => {
      visits.push({ id: newId(), patientId: patients[pi].id, practitionerId: practitioners[k % practitioners.length].id, startsAt: atHour(0, hour, minute), kind, status, notes: '', createdAt: now, updatedAt: now });
    });
    for (const v of visits) await tx.getRepository(Visit).insert(v);
    const config = loadConfig();
    await insertDemoTreatments(tx, { visits, products, config, now: new Date() });
    await insertDemoStock(tx, { products, receivedById: practitioners[0].id, today: dayIn(config.clinicTimeZone) });
  });
  return true;
}
