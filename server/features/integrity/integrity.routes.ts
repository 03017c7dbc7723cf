import type { Router } from 'express';
import { allow } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { ChainDigest } from '../../entities/record-chain.js';
import { audit } from '../../lib/audit.js';
import { signingIdentity } from '../../signing/pdf-signing.js';
import { CHAIN_ORDER, CHAINS } from './chain.js';
import type { IntegrityCheck, IntegrityOverview } from './integrity.schemas.js';
import { chainHeads, walkChains } from './walk.js';

/** Admins: the chain heads, the signing certificate, the digests e-mailed, and a full walk of the chains on demand. */
export function registerIntegrityRoutes(r: Router, deps: Deps): void {
  const { db, config } = deps;

  r.get('/api/integrity', allow('admin'), async (_req, res) => {
    const heads = await chainHeads(db);
    const digests = await db.getRepository(ChainDigest).find({ order: { day: 'DESC' }, take: 14 });
    const id = await signingIdentity(db, config);
    const overview: IntegrityOverview = {
      chains: CHAIN_ORDER.map((name) => ({ chain: name, label: CHAINS[name].label, table: CHAINS[name].table, ...heads[name] })),
      digests: digests.map((d) => ({ day: d.day, createdAt: d.createdAt, recipients: d.recipients, heads: JSON.parse(d.heads) as Record<string, { seq: number; hash: string }> })),
      certificate: { commonName: id.commonName, fingerprint: id.fingerprint, notAfter: id.notAfter, source: id.source },
    };
    res.json(overview);
  });

  r.post('/api/integrity/check', allow('admin'), async (req, res) => {
    const reports = await walkChains(db);
    await audit(db, req, { action: 'integrity.check', details: { ok: reports.every((x) => x.ok), broken: reports.filter((x) => !x.ok).map((x) => x.chain) } });
    const check: IntegrityCheck = { checkedAt: new Date().toISOString(), ok: reports.every((x) => x.ok), chains: reports };
    res.json(check);
  });
}
