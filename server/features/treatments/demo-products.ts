import type { DataSource, EntityManager } from 'typeorm';
import { Product } from '../../entities/product.js';
import { newId } from '../../lib/time.js';

/**
 * The demo clinic's catalogue. Names and makers are invented; fillers come in 1 mL syringes and the
 * neuromodulator in a 100 U vial (FACTS 17 and 20, common practice).
 */
export const DEMO_PRODUCTS: Pick<Product, 'name' | 'kind' | 'unit' | 'manufacturer' | 'packSize'>[] = [
  { name: 'Soft-gel HA lip filler with lidocaine', kind: 'filler', unit: 'mL', manufacturer: 'Calderwick Biolabs (demo)', packSize: 1 },
  { name: 'Firm-gel HA lip and contour filler', kind: 'filler', unit: 'mL', manufacturer: 'Calderwick Biolabs (demo)', packSize: 1 },
  { name: 'Fine-line HA filler for borders', kind: 'filler', unit: 'mL', manufacturer: 'Orrinmoor Medical (demo)', packSize: 1 },
  { name: 'Neuromodulator type A, 100 U vial', kind: 'toxin', unit: 'U', manufacturer: 'Harlowvale Pharma (demo)', packSize: 100 },
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
