import type { DataSource, EntityManager } from 'typeorm';
import { Product } from '../../entities/product.js';
import { newId } from '../../lib/time.js';

/**
 * The demo clinic's catalogue. Names and makers are invented; fillers come in 1 mL syringes, the neuromodulator in
 * a 100 U vial (FACTS 17 and 28, common practice). The GTINs are invented in the GS1 restricted-circulation range
 * (prefix 2 of a GTIN-13), which no real product carries; their check digits are real (GS1 mod-10).
 */
export const DEMO_PRODUCTS: Pick<Product, 'name' | 'kind' | 'unit' | 'unitLabel' | 'manufacturer' | 'packSize' | 'gtin'>[] = [
  { name: 'Soft-gel HA lip filler with lidocaine', kind: 'filler', unit: 'mL', unitLabel: null, manufacturer: 'Calderwick Biolabs (demo)', packSize: 1, gtin: '02912345000103' },
  { name: 'Firm-gel HA lip and contour filler', kind: 'filler', unit: 'mL', unitLabel: null, manufacturer: 'Calderwick Biolabs (demo)', packSize: 1, gtin: '02912345000202' },
  { name: 'Fine-line HA filler for borders', kind: 'filler', unit: 'mL', unitLabel: null, manufacturer: 'Orrinmoor Medical (demo)', packSize: 1, gtin: '02912345000301' },
  { name: 'Neuromodulator type A, 100 U vial', kind: 'toxin', unit: 'U', unitLabel: 'Harlowvale units', manufacturer: 'Harlowvale Pharma (demo)', packSize: 100, gtin: '02912345000400' },
  { name: 'Hyaluronidase 1500 U vial', kind: 'hyaluronidase', unit: 'U', unitLabel: 'Fenwell units', manufacturer: 'Fenwell Laboratories (demo)', packSize: 1500, gtin: '02912345000509' },
];

/** Inserts the demo catalogue, one row at a time (a bulk insert re-assigns string ids on SQLite). */
export async function insertDemoProducts(db: DataSource | EntityManager, now: string): Promise<Product[]> {
  const out: Product[] = [];
  for (const p of DEMO_PRODUCTS) {
    const row = db.getRepository(Product).create({ id: newId(), ...p, active: true, createdAt: now, updatedAt: now });
    await db.getRepository(Product).insert(row);
    out.push(row);
  }
  return out;
}
