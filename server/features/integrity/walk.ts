import { IsNull, MoreThan, type DataSource, type EntityManager } from 'typeorm';
import { ConsentEvidence } from '../../entities/consent-evidence.js';
import { ConsentRecord } from '../../entities/consent-record.js';
import { ChainDigest, ChainHead, ChainTombstone } from '../../entities/record-chain.js';
import { CHAIN_ORDER, CHAINS, GENESIS, linkHash, rowHashOf, type ChainDefinition } from './chain.js';
import type { ChainBreak, ChainName, ChainReport } from './integrity.schemas.js';

export type { ChainBreak, ChainReport };

const BATCH = 1000;

type Entry = { seq: number; rowId: string; prevHash: string; rowHash: string; computed: string | null };

/** Every link of one chain in order: live rows (whose content is re-hashed) merged with the tombstones of erased ones. */
async function* entries(db: DataSource, chain: ChainDefinition): AsyncGenerator<Entry> {
  const repo = db.getRepository<Record<string, unknown>>(chain.entity);
  const tombstones = await db.getRepository(ChainTombstone).find({ where: { chain: chain.name }, order: { seq: 'ASC' } });
  let t = 0;
  let after = 0;
  for (;;) {
    const rows = await repo.find({ where: { chainSeq: MoreThan(after) }, order: { chainSeq: 'ASC' }, take: BATCH });
    for (const r of rows) {
      const seq = Number(r.chainSeq);
      while (t < tombstones.length && tombstones[t].seq < seq) yield { ...tombstones[t++], computed: null };
      yield { seq, rowId: String(r.id), prevHash: String(r.prevHash), rowHash: String(r.rowHash), computed: rowHashOf(chain, seq, r) };
      after = seq;
    }
    if (rows.length < BATCH) break;
  }
  while (t < tombstones.length) yield { ...tombstones[t++], computed: null };
}

/**
 * Walks one chain from its first row to its head and names the first broken row:
 * - a row whose content no longer gives its stored hash (it was edited);
 * - a row that the next one was not chained to (it was rewritten together with its stored hash);
 * - a gap in the sequence (a row deleted without an erasure's tombstone);
 * - a last row that does not give the head, or a head that a daily digest e-mailed differently;
 * - rows that bypassed the chain (no place in it).
 */
export async function walkChain(db: DataSource, name: ChainName): Promise<ChainReport> {
  const chain = CHAINS[name];
  const head = await db.getRepository(ChainHead).findOneBy({ chain: name });
  const digests = await db.getRepository(ChainDigest).find({ order: { day: 'ASC' } });
  // seq → what was e-mailed for it, the oldest digest first.
  const published = new Map<number, { day: string; hash: string }>();
  for (const d of digests) {
    const h = (JSON.parse(d.heads) as Record<string, { seq: number; hash: string } | undefined>)[name];
    if (h && h.seq > 0 && !published.has(h.seq)) published.set(h.seq, { day: d.day, hash: h.hash });
  }
  const report: ChainReport = {
    chain: name,
    label: chain.label,
    table: chain.table,
    ok: false,
    rows: 0,
    tombstones: 0,
    head: head ? { seq: Number(head.seq), hash: head.hash, updatedAt: head.updatedAt } : null,
    digestsChecked: 0,
    problem: null,
  };
  const fail = (problem: ChainBreak) => ({ ...report, problem });
  if (!head) return fail({ table: 'chain_head', seq: null, rowId: null, message: `The ${chain.label.toLowerCase()} chain has no head row.` });

  let prev = GENESIS;
  let expected = 1;
  let last: Entry | null = null;
  for await (const e of entries(db, chain)) {
    const where = { table: e.computed === null ? 'chain_tombstone' : chain.table, seq: e.seq, rowId: e.rowId };
    if (e.seq !== expected) {
      return fail({ ...where, seq: expected, message: `Row #${expected} of ${chain.table} is missing (deleted outside an erasure); the chain resumes at row #${e.seq} (id ${e.rowId}).` });
    }
    if (e.computed !== null && e.computed !== e.rowHash) {
      return fail({ ...where, message: `Row #${e.seq} of ${chain.table} (id ${e.rowId}) was changed: its content no longer matches its stored hash.` });
    }
    if (e.prevHash !== prev) {
      // The previous row passed its own check, so it (and its stored hash) was rewritten after this row was chained to it.
      const before = last!;
      return fail({
        table: before.computed === null ? 'chain_tombstone' : chain.table,
        seq: before.seq,
        rowId: before.rowId,
        message: `Row #${before.seq} of ${chain.table} (id ${before.rowId}) was rewritten: row #${e.seq} was chained to a different version of it.`,
      });
    }
    prev = linkHash(e.prevHash, e.rowHash);
    const mailed = published.get(e.seq);
    if (mailed) {
      report.digestsChecked += 1;
      if (mailed.hash !== prev) {
        return fail({ ...where, message: `The chain up to row #${e.seq} of ${chain.table} (id ${e.rowId}) differs from the head e-mailed to the admins on ${mailed.day}: a row at or before it was rewritten.` });
      }
    }
    report.rows += 1;
    if (e.computed === null) report.tombstones += 1;
    last = e;
    expected += 1;
  }
  const headSeq = Number(head.seq);
  if (headSeq > report.rows) {
    return fail({ table: chain.table, seq: report.rows + 1, rowId: null, message: `Rows #${report.rows + 1} to #${headSeq} of ${chain.table} are missing: the head counts ${headSeq} rows.` });
  }
  if (headSeq < report.rows || head.hash !== prev) {
    return fail({
      table: last?.computed === null ? 'chain_tombstone' : chain.table,
      seq: last?.seq ?? null,
      rowId: last?.rowId ?? null,
      message: `Row #${last?.seq} of ${chain.table} (id ${last?.rowId}) does not lead to the chain head: it or the head was rewritten.`,
    });
  }
  const unchained = await db.getRepository<Record<string, unknown>>(chain.entity).findOne({ where: { chainSeq: IsNull() } });
  if (unchained) {
    return fail({ table: chain.table, seq: null, rowId: String(unchained.id), message: `Row id ${String(unchained.id)} of ${chain.table} is not in the chain: it was written around it.` });
  }
  if (name === 'consent') {
    const mismatch = await withdrawalMismatch(db);
    if (mismatch) return fail(mismatch);
  }
  return { ...report, ok: true };
}

/**
 * A record's withdrawal fields are outside its hash (they are set once, later); the withdrawal itself is a chained
 * evidence row. Both must say the same thing.
 */
async function withdrawalMismatch(db: DataSource): Promise<ChainBreak | null> {
  const withdrawn = await db.getRepository(ConsentEvidence).findBy({ event: 'consent.withdrawn' });
  const byConsent = new Map(withdrawn.map((e) => [e.consentId, e]));
  const records = await db
    .getRepository(ConsentRecord)
    .createQueryBuilder('r')
    .where('r.withdrawnAt IS NOT NULL')
    .orWhere('r.id IN (:...ids)', { ids: [...byConsent.keys(), ''] })
    .getMany();
  for (const r of records) {
    const e = byConsent.get(r.id);
    const d = e ? (JSON.parse(e.details) as { date?: string; reason?: string }) : null;
    const agrees = e && d && r.withdrawnAt === e.at && r.withdrawnById === e.actorId && r.withdrawalDate === d.date && r.withdrawalReason === d.reason;
    if (!agrees) {
      return {
        table: 'consent_record',
        seq: r.chainSeq ?? null,
        rowId: r.id,
        message: `Row #${r.chainSeq} of consent_record (id ${r.id}): its withdrawal fields do not match its chained withdrawal evidence.`,
      };
    }
  }
  return null;
}

/** Every chain, in lock order. */
export async function walkChains(db: DataSource): Promise<ChainReport[]> {
  const out: ChainReport[] = [];
  for (const name of CHAIN_ORDER) out.push(await walkChain(db, name));
  return out;
}

/** The current heads, as shown to admins and e-mailed daily. */
export async function chainHeads(db: DataSource | EntityManager): Promise<Record<ChainName, { seq: number; hash: string; updatedAt: string }>> {
  const rows = await db.getRepository(ChainHead).find();
  const out = {} as Record<ChainName, { seq: number; hash: string; updatedAt: string }>;
  for (const name of CHAIN_ORDER) {
    const h = rows.find((r) => r.chain === name);
    out[name] = h ? { seq: Number(h.seq), hash: h.hash, updatedAt: h.updatedAt } : { seq: 0, hash: GENESIS, updatedAt: '' };
  }
  return out;
}

/**
 * Whether one chained row still holds its place: its content gives its stored hash, and the next row (or the head,
 * for the last) is chained to it. A row rewritten together with its stored hash fails the second test. Used where
 * a whole walk would be too slow (the public verify page).
 */
export async function rowIntact(db: DataSource, name: ChainName, row: Record<string, unknown>): Promise<boolean> {
  const chain = CHAINS[name];
  const seq = Number(row.chainSeq);
  if (!Number.isInteger(seq) || seq < 1 || rowHashOf(chain, seq, row) !== row.rowHash) return false;
  const link = linkHash(String(row.prevHash), String(row.rowHash));
  const next =
    (await db.getRepository<Record<string, unknown>>(chain.entity).findOneBy({ chainSeq: seq + 1 })) ??
    (await db.getRepository(ChainTombstone).findOneBy({ chain: name, seq: seq + 1 }));
  if (next) return next.prevHash === link;
  const head = await db.getRepository(ChainHead).findOneBy({ chain: name });
  return Boolean(head && Number(head.seq) === seq && head.hash === link);
}
