/** Shapes of the record-integrity API, shared with the client (types only, no runtime dependencies). */

export type ChainName = 'consent' | 'evidence' | 'access';

/** The first thing found wrong in a chain, naming the row. */
export interface ChainBreak {
  table: string;
  seq: number | null;
  rowId: string | null;
  message: string;
}

export interface ChainReport {
  chain: ChainName;
  label: string;
  table: string;
  ok: boolean;
  /** Rows walked, and of those the erased rows kept as tombstones. */
  rows: number;
  tombstones: number;
  head: { seq: number; hash: string; updatedAt: string } | null;
  /** How many heads e-mailed in daily digests the walk met and matched. */
  digestsChecked: number;
  problem: ChainBreak | null;
}

export interface IntegrityCheck {
  checkedAt: string;
  ok: boolean;
  chains: ChainReport[];
}

export interface IntegrityOverview {
  chains: { chain: ChainName; label: string; table: string; seq: number; hash: string; updatedAt: string }[];
  digests: { day: string; createdAt: string; recipients: number; heads: Partial<Record<ChainName, { seq: number; hash: string }>> }[];
  certificate: { commonName: string; fingerprint: string; notAfter: string; source: 'generated' | 'configured' };
}
