import type { Router } from 'express';
import type { EntityManager } from 'typeorm';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Product } from '../../entities/product.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { productInputSchema, productListQuerySchema, productUpdateSchema } from './treatments.schemas.js';

const idParams = z.object({ id: uuidParam });

/** One GTIN names one product, so a scanned box finds exactly one catalogue entry. */
async function assertGtinFree(tx: EntityManager, gtin: string | null, ownId: string): Promise<void> {
  if (!gtin) return;
  const other = await tx.getRepository(Product).findOneBy({ gtin });
  if (other && other.id !== ownId) throw conflict(`GTIN ${gtin} is already on ${other.name}.`, [{ path: 'gtin', message: `Already on ${other.name}.` }], 'GTIN_TAKEN');
}

/** The product catalogue: clinicians read it to record treatments, admins keep it. */
export function registerProductRoutes(r: Router, { db }: Deps): void {
  const products = db.getRepository(Product);

  const list = validate({ query: productListQuerySchema });
  r.get('/api/products', allow(...CLINICAL), list, async (req, res) => {
    const { query } = parsed(req, list);
    const rows = await products.find({ where: query.all === '1' ? {} : { active: true }, order: { kind: 'ASC', name: 'ASC' } });
    res.json(rows);
  });

  const create = validate({ body: productInputSchema });
  r.post('/api/products', allow('admin'), create, async (req, res) => {
    const { body } = parsed(req, create);
    const now = nowIso();
    const row = products.create({ id: newId(), ...body, createdAt: now, updatedAt: now });
    await db.transaction(async (tx) => {
      await assertGtinFree(tx, row.gtin, row.id);
      await tx.getRepository(Product).insert(row);
      await audit(tx, req, { action: 'product.create', targetType: 'product', targetId: row.id, details: { name: row.name, kind: row.kind } });
    });
    res.status(201).json(row);
  });

  const update = validate({ params: idParams, body: productUpdateSchema });
  r.patch('/api/products/:id', allow('admin'), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    const row = await products.findOneBy({ id: params.id });
    if (!row) throw notFound('Product');
    // Kind and unit never change: recorded lines depend on them. A different product is a new catalogue entry.
    Object.assign(row, body, { updatedAt: nowIso() });
    if (row.unit === 'U' && !row.unitLabel) throw badRequest("Name this product's units as its labelling does.", [{ path: 'unitLabel', message: "Units of one product are not interchangeable with another's." }]);
    await db.transaction(async (tx) => {
      await assertGtinFree(tx, row.gtin, row.id);
      await tx.getRepository(Product).save(row);
      await audit(tx, req, { action: 'product.edit', targetType: 'product', targetId: row.id, details: { fields: Object.keys(body) } });
    });
    res.json(row);
  });
}
