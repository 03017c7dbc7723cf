import { Column, Entity, PrimaryColumn } from 'typeorm';

/**
 * The head of one tamper-evident chain (consent records, consent evidence, access log): how many rows it holds
 * and the chain hash of the last. Every append updates it inside the inserting transaction, which also locks the
 * row, so two writers (two requests, or two app instances on PostgreSQL) cannot both chain onto the same row.
 */
@Entity('chain_head')
export class ChainHead {
  @PrimaryColumn('varchar', { length: 20 })
  chain: string;

  @Column('integer')
  seq: number;

  @Column('varchar', { length: 64 })
  hash: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;
}

/**
 * What is left of a chained row after a patient's erasure: its place and hashes, none of its content, so the
 * chain still verifies. Written only inside an erasure (a trigger refuses it otherwise); never changed or deleted.
 */
@Entity('chain_tombstone')
export class ChainTombstone {
  @PrimaryColumn('varchar', { length: 20 })
  chain: string;

  @PrimaryColumn('integer')
  seq: number;

  @Column('varchar', { length: 36 })
  rowId: string;

  @Column('varchar', { length: 64 })
  prevHash: string;

  @Column('varchar', { length: 64 })
  rowHash: string;

  @Column('varchar', { length: 36 })
  erasureId: string;

  @Column('varchar', { length: 30 })
  erasedAt: string;
}

/** The chain heads e-mailed to the admins on one day: once sent, a later rewrite of the chains cannot match them. */
@Entity('chain_digest')
export class ChainDigest {
  /** The clinic's calendar day, YYYY-MM-DD. */
  @PrimaryColumn('varchar', { length: 10 })
  day: string;

  @Column('varchar', { length: 30 })
  createdAt: string;

  /** JSON object chain → { seq, hash }. */
  @Column('text')
  heads: string;

  @Column('integer')
  recipients: number;
}

/** The columns a chained row carries, filled in by the chain on insert: callers leave them out. */
export type ChainFields = 'chainSeq' | 'prevHash' | 'rowHash';
