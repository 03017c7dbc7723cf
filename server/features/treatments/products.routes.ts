import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Product } from '../../entities/product.js';
import { audit } from '../../lib/audit.js';
import { notFound } from '../../lib/errors.js';
import { newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { productInputSchema, productListQuerySchema, productUpdateSchema } from './treatments.schemas.js';

const idParams = z.object({ id: uuidParam });

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
    await db.transaction(async (tx) => {
      await tx.getRepository(Product).save(row);
      await audit(tx, req, { action: 'product.edit', targetType: 'product', targetId: row.id, details: { fields: Object.keys(body) } });
    });
    res.json(row);
  });
}
