import type { DataSource, EntityManager } from 'typeorm';
import { Patient } from '../../entities/patient.js';

/** A date of birth typed as YYYY-MM-DD or DD/MM/YYYY (also with dots), as an ISO date; null when `q` is not one. */
function dateOfBirthIn(q: string): string | null {
  if (/^\d{4}-\d{2}-\d{2}$/.test(q)) return q;
  const dmy = /^(\d{1,2})[/.](\d{1,2})[/.](\d{4})$/.exec(q);
  return dmy ? `${dmy[3]}-${dmy[2].padStart(2, '0')}-${dmy[1].padStart(2, '0')}` : null;
}

/** The trigram index finds runs of 3 or more characters; shorter words only narrow what it found. */
const TRIGRAM = 3;

const likeEscaped = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);
/** One FTS5 string literal: the word is matched as a substring, whatever punctuation it holds. */
const ftsPhrase = (s: string) => `"${s.replace(/"/g, '""')}"`;

/**
 * Patients matching a search by name, clinic code or date of birth (YYYY-MM-DD or DD/MM/YYYY). Every word of the
 * search must appear somewhere in the name or code, in any order, ignoring case and accents for words of 3+
 * characters (the trigram index of `patient_search`); a search of only short words matches the start of a first or
 * last name (the case-insensitive name indexes). Every path is an index lookup, so the time stays flat as the list
 * grows (`npm run bench:scale`).
 */
export async function searchPatients(
  db: DataSource,
  opts: { q?: string; page: number; pageSize: number; archived: boolean },
): Promise<{ items: Patient[]; total: number; page: number; pageSize: number }> {
  const qb = db.getRepository(Patient).createQueryBuilder('p').where('p.archived = :archived', { archived: opts.archived });
  const q = opts.q?.trim();
  if (q) {
    const dob = dateOfBirthIn(q);
    if (dob) {
      qb.andWhere('p.dateOfBirth = :dob', { dob });
    } else {
      const words = q.split(/\s+/);
      const long = words.filter((w) => [...w].length >= TRIGRAM);
      const short = words.filter((w) => [...w].length < TRIGRAM);
      if (long.length) {
        qb.andWhere(
          `p.id IN (SELECT k."patientId" FROM "patient_search_key" k WHERE k."id" IN (SELECT "rowid" FROM "patient_search" WHERE "patient_search" MATCH :match))`,
          { match: long.map(ftsPhrase).join(' AND ') },
        );
      } else {
        const first = `${likeEscaped(short.shift()!)}%`;
        qb.andWhere(`(p.lastName LIKE :first ESCAPE '\\' OR p.firstName LIKE :first ESCAPE '\\')`, { first });
      }
      short.forEach((w, i) => {
        qb.andWhere(`(p.firstName || ' ' || p.lastName || ' ' || p.code) LIKE :w${i} ESCAPE '\\'`, { [`w${i}`]: `%${likeEscaped(w)}%` });
      });
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

/**
 * Next free clinic code, e.g. "LR-0013", from the prefix's counter (no scan of the patients). Runs inside the
 * creating transaction, so a rolled-back creation gives its number back.
 */
export async function nextPatientCode(tx: Pick<EntityManager, 'query'>, prefix: string): Promise<string> {
  const rows = (await tx.query(
    `INSERT INTO "patient_code_counter" ("prefix", "last") VALUES (?, 1) ON CONFLICT ("prefix") DO UPDATE SET "last" = "last" + 1 RETURNING "last"`,
    [prefix],
  )) as { last: number }[];
  return `${prefix}-${String(rows[0].last).padStart(4, '0')}`;
}
