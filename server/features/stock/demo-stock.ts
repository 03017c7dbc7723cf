import type { EntityManager } from 'typeorm';
import type { Product } from '../../entities/product.js';
import { StockLot } from '../../entities/stock.js';
import { addDays, addMonths, newId, nowIso } from '../../lib/time.js';
import { moveStock } from './stock.service.js';

/**
 * The demo clinic's shelf (invented lot numbers): each product in date, one filler lot expiring within the warning
 * window so the clinic day shows it, and hyaluronidase in the emergency kit.
 */
const DEMO_LOTS: { product: string; lot: string; months?: number; days?: number; packs: number }[] = [
  { product: 'Soft-gel HA lip filler with lidocaine', lot: 'CW-24B-0193', months: 14, packs: 6 },
  { product: 'Soft-gel HA lip filler with lidocaine', lot: 'CW-24A-0071', days: 20, packs: 2 },
  { product: 'Firm-gel HA lip and contour filler', lot: 'CW-25F-0412', months: 10, packs: 4 },
  { product: 'Fine-line HA filler for borders', lot: 'OM-7731', months: 8, packs: 3 },
  { product: 'Neuromodulator type A, 100 U vial', lot: 'HV-NM-5521', months: 9, packs: 3 },
  { product: 'Hyaluronidase 1500 U vial', lot: 'FW-HY-2208', months: 11, packs: 2 },
];

export async function insertDemoStock(tx: EntityManager, input: { products: Product[]; receivedById: string; today: string }): Promise<void> {
  for (const d of DEMO_LOTS) {
    const product = input.products.find((p) => p.name === d.product);
    if (!product) continue;
    const expiryDate = d.days !== undefined ? addDays(input.today, d.days) : addMonths(input.today, d.months!);
    const id = newId();
    await tx.getRepository(StockLot).insert({ id, productId: product.id, lotNumber: d.lot, expiryDate, onHand: 0, receivedAt: nowIso(), receivedById: input.receivedById, notes: '' });
    await moveStock(tx, { lotId: id, delta: d.packs, reason: 'received', note: 'Opening stock of the demo clinic', byId: input.receivedById });
  }
}
