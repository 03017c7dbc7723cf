import type { DataSource } from 'typeorm';
import { Patient } from '../../entities/patient.js';

/** Patients matching a search by name, clinic code or date of birth (YYYY-MM-DD or DD/MM/YYYY). */
export async function searchPatients(
  db: DataSource,
  opts: { q?: string; page: number; pageSize: number; archived: boolean },
): Promise<{ items: Patient[]; total: number; page: number; pageSize: number }> {
  const qb = db.getRepository(Patient).createQueryBuilder('p').where('p.archived = :archived', { archived: opts.archived });
  const q = opts.q?.trim();
  if (q) {
    const dmy = /^(\d{1,2})[/.](\d{1,2})[/.](\d{4})$/.exec(q);
    const dob = /^\d{4}-\d{2}-\d{2}$/.test(q) ? q : dmy ? `${dmy[3]}-${dmy[2].padStart(2, '0')}-${dmy[1].padStart(2, '0')}` : null;
    if (dob) {
      qb.andWhere('p.dateOfBirth = :dob', { dob });
    } else {
      const like = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      qb.andWhere(
        `(p.firstName LIKE :like ESCAPE '\\' OR p.lastName LIKE :like ESCAPE '\\' OR (p.firstName || ' ' || p.lastName) LIKE :like ESCAPE '\\' OR p.code LIKE :like ESCAPE '\\')`,
        { like },
      );
    }
  }
  const [items, total] = await qb
    .orderBy('p.lastName', 'ASC')
    .addOrderBy('p.firstName', 'ASC')
    .skip((opts.page - 1) * opts.pageSize)
    .take(opts.pageSize)
    .getManyAndCount();
  return { items, total, page: opts.page, pageSize: opts.pageSize };
}

/** Next free clinic code, e.g. "LR-0013". Runs inside the creating transaction. */
export async function nextPatientCode(db: Pick<DataSource, 'getRepository'>, prefix: string): Promise<string> {
  const last = await db
    .getRepository(Patient)
    .createQueryBuilder('p')
    .where('p.code LIKE :p', { p: `${prefix}-%` })
    .orderBy('length(p.code)', 'DESC')
    .addOrderBy('p.code', 'DESC')
    .getOne();
  const n = last ? Number(last.code.slice(prefix.length + 1)) + 1 : 1;
  return `${prefix}-${String(n).padStart(4, '0')}`;
}
