import type { DataSource } from 'typeorm';
import { Product } from '../../entities/product.js';
import { StockLot, StockMovement } from '../../entities/stock.js';
import { Treatment, TreatmentDose, TreatmentLine } from '../../entities/treatment.js';
import { User } from '../../entities/user.js';
import { monthsBetween } from './stock.schemas.js';

export interface UsageRow {
  month: string;
  productId: string;
  productName: string;
  kind: string;
  unit: 'mL' | 'U';
  unitLabel: string | null;
  practitionerId: string;
  practitionerName: string;
  /** Amount given, in the product's unit (sum of the zone amounts). */
  amount: number;
  treatments: number;
  /** Packs taken from stock for these treatments. */
  packs: number;
}

export interface UsageReport {
  from: string;
  to: string;
  months: string[];
  rows: UsageRow[];
}

/** The months from `from` to `to` inclusive, as YYYY-MM. */
export function monthRange(from: string, to: string): string[] {
  const [y, m] = from.split('-').map(Number);
  return Array.from({ length: monthsBetween(from, to) + 1 }, (_, i) => {
    const d = new Date(Date.UTC(y, m - 1 + i, 1));
    return `${d.getUTCFullYear()}-${String(d.getUTCMonth() + 1).padStart(2, '0')}`;
  });
}

/**
 * What each practitioner used of each product per month, by the treatment's calendar day in the clinic's time zone.
 * Amounts of different products are never added together: units of one product are not another's (FACTS 28).
 */
export async function usageReport(db: DataSource, from: string, to: string): Promise<UsageReport> {
  const months = monthRange(from, to);
  const [ty, tm] = to.split('-').map(Number);
  const range = { start: `${from}-01`, end: new Date(Date.UTC(ty, tm, 1)).toISOString().slice(0, 10) };
  const month = 'substr(t."treatedOn", 1, 7)';
  const amounts: Record<string, string | number | null>[] = await db
    .createQueryBuilder()
    .from(Treatment, 't')
    .innerJoin(TreatmentLine, 'l', 'l."treatmentId" = t."id"')
    .innerJoin(TreatmentDose, 'd', 'd."lineId" = l."id"')
    .innerJoin(Product, 'p', 'p."id" = l."productId"')
    .innerJoin(User, 'u', 'u."id" = t."practitionerId"')
    .select(month, 'month')
    .addSelect('p."id"', 'productId')
    .addSelect('p."name"', 'productName')
    .addSelect('p."kind"', 'kind')
    .addSelect('p."unit"', 'unit')
    .addSelect('p."unitLabel"', 'unitLabel')
    .addSelect('t."practitionerId"', 'practitionerId')
    .addSelect('u."name"', 'practitionerName')
    .addSelect('COUNT(DISTINCT t."id")', 'treatments')
    .addSelect('SUM(d."amountMilli")', 'milli')
    .where('t."treatedOn" >= :start AND t."treatedOn" < :end', range)
    .groupBy(month)
    .addGroupBy('p."id"')
    .addGroupBy('p."name"')
    .addGroupBy('p."kind"')
    .addGroupBy('p."unit"')
    .addGroupBy('p."unitLabel"')
    .addGroupBy('t."practitionerId"')
    .addGroupBy('u."name"')
    .getRawMany();
  const packs: Record<string, string | number | null>[] = await db
    .createQueryBuilder()
    .from(StockMovement, 'm')
    .innerJoin(StockLot, 'sl', 'sl."id" = m."lotId"')
    .innerJoin(Treatment, 't', 't."id" = m."treatmentId"')
    .select(month, 'month')
    .addSelect('sl."productId"', 'productId')
    .addSelect('t."practitionerId"', 'practitionerId')
    .addSelect('SUM(-m."delta")', 'packs')
    .where('t."treatedOn" >= :start AND t."treatedOn" < :end', range)
    .groupBy(month)
    .addGroupBy('sl."productId"')
    .addGroupBy('t."practitionerId"')
    .getRawMany();
  const key = (r: Record<string, unknown>) => `${r.month}|${r.productId}|${r.practitionerId}`;
  const packsBy = new Map(packs.map((r) => [key(r), Number(r.packs)]));
  const rows: UsageRow[] = amounts.map((r) => ({
    month: String(r.month),
    productId: String(r.productId),
    productName: String(r.productName),
    kind: String(r.kind),
    unit: r.unit as UsageRow['unit'],
    unitLabel: r.unitLabel === null ? null : String(r.unitLabel),
    practitionerId: String(r.practitionerId),
    practitionerName: String(r.practitionerName),
    amount: Number(r.milli) / 1000,
    treatments: Number(r.treatments),
    packs: packsBy.get(key(r)) ?? 0,
  }));
  rows.sort((a, b) => a.month.localeCompare(b.month) || a.productName.localeCompare(b.productName) || a.practitionerName.localeCompare(b.practitionerName));
  return { from, to, months, rows };
}
