import type { DataSource, EntityManager } from 'typeorm';
import type { Product } from '../../entities/product.js';
import { StockLot, StockMovement, type StockReason } from '../../entities/stock.js';
import { conflict } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { lotStatus, type LotStatus } from '../treatments/dates.js';

export interface LotView {
  id: string;
  productId: string;
  productName: string;
  kind: Product['kind'];
  unit: Product['unit'];
  unitLabel: string | null;
  packSize: number | null;
  lotNumber: string;
  expiryDate: string;
  onHand: number;
  /** The lot's expiry against the given clinic day. */
  status: LotStatus;
  receivedAt: string;
  notes: string;
}

export function lotView(lot: StockLot & { product?: Product }, today: string, warnDays: number): LotView {
  const p = lot.product!;
  return {
    id: lot.id,
    productId: lot.productId,
    productName: p.name,
    kind: p.kind,
    unit: p.unit,
    unitLabel: p.unitLabel,
    packSize: p.packSize,
    lotNumber: lot.lotNumber,
    expiryDate: lot.expiryDate,
    onHand: lot.onHand,
    status: lotStatus(lot.expiryDate, today, warnDays),
    receivedAt: lot.receivedAt,
    notes: lot.notes,
  };
}

export interface Movement {
  lotId: string;
  delta: number;
  reason: StockReason;
  treatmentId?: string | null;
  episodeId?: string | null;
  note?: string;
  byId: string | null;
}

/**
 * Changes a lot's count by one ledger entry, inside the caller's transaction. A change that would leave fewer than
 * zero packs is refused with a 409 before anything is written (and the CHECK on `onHand` refuses it in the database
 * whatever writes it).
 */
export async function moveStock(tx: EntityManager, m: Movement): Promise<StockLot> {
  const lots = tx.getRepository(StockLot);
  const lot = await lots.findOne({ where: { id: m.lotId }, relations: { product: true } });
  if (!lot) throw conflict('That stock lot does not exist.', undefined, 'STOCK_LOT_UNKNOWN');
  if (lot.onHand + m.delta < 0) {
    throw conflict(
      `Lot ${lot.lotNumber} of ${lot.product?.name ?? 'this product'} has ${lot.onHand} ${lot.onHand === 1 ? 'pack' : 'packs'} in stock, not ${-m.delta}. Receive the stock first, or correct the count.`,
      [{ path: 'stock', lotId: lot.id, lotNumber: lot.lotNumber, onHand: lot.onHand, requested: -m.delta }],
      'STOCK_INSUFFICIENT',
    );
  }
  await lots.createQueryBuilder().update(StockLot).set({ onHand: () => '"onHand" + :delta' }).where('id = :id', { id: lot.id, delta: m.delta }).execute();
  await tx.getRepository(StockMovement).insert({
    id: newId(),
    lotId: lot.id,
    delta: m.delta,
    reason: m.reason,
    treatmentId: m.treatmentId ?? null,
    episodeId: m.episodeId ?? null,
    note: m.note ?? '',
    at: nowIso(),
    byId: m.byId,
  });
  return { ...lot, onHand: lot.onHand + m.delta };
}

/** Lots with packs on the shelf whose expiry has passed or falls within `warnDays` of the clinic day. */
export async function stockAlerts(db: DataSource, today: string, warnDays: number): Promise<{ expired: LotView[]; expiringSoon: LotView[] }> {
  const lots = await db
    .getRepository(StockLot)
    .createQueryBuilder('l')
    .innerJoinAndSelect('l.product', 'p')
    .where('l.onHand > 0')
    .orderBy('l.expiryDate', 'ASC')
    .getMany();
  const views = lots.map((l) => lotView(l, today, warnDays));
  return { expired: views.filter((v) => v.status.state === 'expired'), expiringSoon: views.filter((v) => v.status.state === 'expires-soon') };
}

export interface EmergencyKit {
  date: string;
  /** ok: in date beyond the warning window; expires-soon: in date, but every lot expires within it; none: no in-date hyaluronidase on the shelf. */
  state: 'ok' | 'expires-soon' | 'none';
  /** The last day the kit is in date (the latest expiry of the in-date lots). */
  inDateUntil: string | null;
  vials: number;
  lots: LotView[];
}

/**
 * Whether the clinic holds in-date hyaluronidase on the clinic day. Clinics that give HA filler keep an in-date
 * supply of the reversal agent (FACTS 29: published consensus guidance on vascular occlusion).
 */
export async function emergencyKit(db: DataSource, today: string, warnDays: number): Promise<EmergencyKit> {
  const lots = await db
    .getRepository(StockLot)
    .createQueryBuilder('l')
    .innerJoinAndSelect('l.product', 'p')
    .where(`p.kind = 'hyaluronidase' AND l.onHand > 0 AND l.expiryDate >= :today`, { today })
    .orderBy('l.expiryDate', 'DESC')
    .getMany();
  const views = lots.map((l) => lotView(l, today, warnDays));
  if (!views.length) return { date: today, state: 'none', inDateUntil: null, vials: 0, lots: [] };
  const inDateUntil = views[0].expiryDate;
  return {
    date: today,
    state: views.every((v) => v.status.state === 'expires-soon') ? 'expires-soon' : 'ok',
    inDateUntil,
    vials: views.reduce((n, v) => n + v.onHand, 0),
    lots: views,
  };
}
