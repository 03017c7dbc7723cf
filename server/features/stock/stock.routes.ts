import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Product } from '../../entities/product.js';
import { StockLot, StockMovement } from '../../entities/stock.js';
import { audit } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { dayIn, newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { getSettings } from '../settings/settings.service.js';
import { adjustLotSchema, receiveLotSchema, stockDayQuerySchema, stockListQuerySchema, usageQuerySchema } from './stock.schemas.js';
import { emergencyKit, lotView, moveStock, stockAlerts } from './stock.service.js';
import { usageReport } from './usage.js';

const idParams = z.object({ id: uuidParam });

/**
 * The shelf: lots per product counted in packs, the day's expiry alerts, the emergency-kit check and the monthly
 * usage report. Stock holds no patient data, so the front desk (who often orders it) may read it; changing it is
 * clinical.
 */
export function registerStockRoutes(r: Router, { db, config }: Deps): void {
  const today = async (date?: string) => date ?? dayIn((await getSettings(db, config)).timeZone);
  const warnDays = config.treatments.lotWarnDays;

  const list = validate({ query: stockListQuerySchema });
  r.get('/api/stock', allow(...STAFF), list, async (req, res) => {
    const { query } = parsed(req, list);
    const qb = db.getRepository(StockLot).createQueryBuilder('l').innerJoinAndSelect('l.product', 'p').orderBy('p.name', 'ASC').addOrderBy('l.expiryDate', 'ASC');
    if (query.all !== '1') qb.andWhere('l.onHand > 0');
    if (query.productId) qb.andWhere('l.productId = :productId', { productId: query.productId });
    const day = await today();
    res.json({ date: day, lots: (await qb.getMany()).map((l) => lotView(l, day, warnDays)) });
  });

  const receive = validate({ body: receiveLotSchema });
  r.post('/api/stock/lots', allow(...CLINICAL), receive, async (req, res) => {
    const { body } = parsed(req, receive);
    const day = await today();
    const { lot, created } = await db.transaction(async (tx) => {
      const product = await tx.getRepository(Product).findOneBy({ id: body.productId });
      if (!product) throw badRequest('That product is not in the catalogue.', [{ path: 'productId', message: 'Choose a product from the catalogue.' }], 'UNKNOWN_PRODUCT');
      let row = await tx.getRepository(StockLot).findOneBy({ productId: product.id, lotNumber: body.lotNumber });
      if (row && row.expiryDate !== body.expiryDate) {
        throw conflict(`Lot ${body.lotNumber} of ${product.name} is on the shelf with expiry ${row.expiryDate}, not ${body.expiryDate}. Check the box.`, [{ path: 'expiryDate', message: `This lot expires on ${row.expiryDate}.` }], 'LOT_EXPIRY_MISMATCH');
      }
      const isNew = !row;
      if (!row) {
        row = tx.getRepository(StockLot).create({ id: newId(), productId: product.id, lotNumber: body.lotNumber, expiryDate: body.expiryDate, onHand: 0, receivedAt: nowIso(), receivedById: req.user!.id, notes: body.notes });
        await tx.getRepository(StockLot).insert(row);
      }
      await moveStock(tx, { lotId: row.id, delta: body.quantity, reason: 'received', note: body.notes, byId: req.user!.id });
      await audit(tx, req, { action: 'stock.receive', targetType: 'stock-lot', targetId: row.id, details: { product: product.name, lot: body.lotNumber, expiry: body.expiryDate, packs: body.quantity } });
      return { lot: (await tx.getRepository(StockLot).findOne({ where: { id: row.id }, relations: { product: true } }))!, created: isNew };
    });
    res.status(created ? 201 : 200).json(lotView(lot, day, warnDays));
  });

  const adjust = validate({ params: idParams, body: adjustLotSchema });
  r.post('/api/stock/lots/:id/adjust', allow(...CLINICAL), adjust, async (req, res) => {
    const { params, body } = parsed(req, adjust);
    if (!(await db.getRepository(StockLot).existsBy({ id: params.id }))) throw notFound('Stock lot');
    const lot = await db.transaction(async (tx) => {
      await moveStock(tx, { lotId: params.id, delta: body.delta, reason: body.reason, note: body.note, byId: req.user!.id });
      await audit(tx, req, { action: 'stock.adjust', targetType: 'stock-lot', targetId: params.id, details: { delta: body.delta, reason: body.reason, note: body.note } });
      return (await tx.getRepository(StockLot).findOne({ where: { id: params.id }, relations: { product: true } }))!;
    });
    res.json(lotView(lot, await today(), warnDays));
  });

  const one = validate({ params: idParams });
  r.get('/api/stock/lots/:id', allow(...CLINICAL), one, async (req, res) => {
    const { params } = parsed(req, one);
    const lot = await db.getRepository(StockLot).findOne({ where: { id: params.id }, relations: { product: true } });
    if (!lot) throw notFound('Stock lot');
    const movements = await db.getRepository(StockMovement).find({ where: { lotId: lot.id }, order: { at: 'ASC' } });
    res.json({ ...lotView(lot, await today(), warnDays), movements: movements.map(({ id, delta, reason, treatmentId, episodeId, note, at, byId }) => ({ id, delta, reason, treatmentId, episodeId, note, at, byId })) });
  });

  const dayQuery = validate({ query: stockDayQuerySchema });
  r.get('/api/stock/alerts', allow(...STAFF), dayQuery, async (req, res) => {
    const { query } = parsed(req, dayQuery);
    const day = await today(query.date);
    res.json({ date: day, warnDays, ...(await stockAlerts(db, day, warnDays)) });
  });

  r.get('/api/stock/emergency-kit', allow(...STAFF), dayQuery, async (req, res) => {
    const { query } = parsed(req, dayQuery);
    res.json(await emergencyKit(db, await today(query.date), warnDays));
  });

  const usage = validate({ query: usageQuerySchema });
  r.get('/api/stock/usage', allow(...CLINICAL), usage, async (req, res) => {
    const { query } = parsed(req, usage);
    res.json(await usageReport(db, query.from, query.to));
  });
}
