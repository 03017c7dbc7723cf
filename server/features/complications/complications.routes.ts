import type { Router } from 'express';
import { z } from 'zod';
import { allow, CLINICAL } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { ComplicationAction, ComplicationEpisode, ComplicationFollowUp } from '../../entities/complication.js';
import { Patient } from '../../entities/patient.js';
import { Product } from '../../entities/product.js';
import { StockLot } from '../../entities/stock.js';
import { Treatment } from '../../entities/treatment.js';
import { Visit } from '../../entities/visit.js';
import { audit, auditPatientRead } from '../../lib/audit.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { dayIn, newId, nowIso } from '../../lib/time.js';
import { parsed, uuidParam, validate } from '../../lib/validate.js';
import { getSettings } from '../settings/settings.service.js';
import { moveStock } from '../stock/stock.service.js';
import { lotStatus } from '../treatments/dates.js';
import { actionSchema, followUpSchema, startEpisodeSchema, updateEpisodeSchema } from './complications.schemas.js';
import { episodeView, loadEpisode } from './complications.service.js';
import { buildEpisodePdf } from './episode-pdf.js';

const idParams = z.object({ id: uuidParam });
const FUTURE_SLACK_MS = 5 * 60_000;

/**
 * Complication episodes: a record of what happened and what was done, started from a treatment. Clinical only.
 * The record shows the clinic's own protocol pointer; it never suggests doses (DESIGN §8).
 */
export function registerComplicationRoutes(r: Router, deps: Deps): void {
  const { db, config } = deps;
  const episodeOr404 = async (id: string) => {
    const e = await loadEpisode(db, id);
    if (!e) throw notFound('Complication episode');
    return e;
  };
  const notInFuture = (iso: string, path: string) => {
    if (Date.parse(iso) > Date.now() + FUTURE_SLACK_MS) throw badRequest('That time is in the future.', [{ path, message: 'Use the time it happened.' }]);
  };

  const start = validate({ params: idParams, body: startEpisodeSchema });
  r.post('/api/visits/:id/complications', allow(...CLINICAL), start, async (req, res) => {
    const { params, body } = parsed(req, start);
    if (!(await db.getRepository(Visit).existsBy({ id: params.id }))) throw notFound('Visit');
    const treatment = await db.getRepository(Treatment).findOneBy({ visitId: params.id });
    if (!treatment) throw conflict('Record the treatment of this visit first: an episode starts from a treatment.', undefined, 'NO_TREATMENT');
    const onsetAt = body.onsetAt ? new Date(body.onsetAt).toISOString() : nowIso();
    notInFuture(onsetAt, 'onsetAt');
    const id = newId();
    const now = nowIso();
    await db.transaction(async (tx) => {
      await tx.getRepository(ComplicationEpisode).insert({
        id,
        patientId: treatment.patientId,
        treatmentId: treatment.id,
        visitId: treatment.visitId,
        startedAt: now,
        startedById: req.user!.id,
        onsetAt,
        signs: JSON.stringify(body.signs),
        signsNotes: body.signsNotes,
        outcome: null,
        outcomeNotes: '',
        outcomeAt: null,
        updatedAt: now,
      });
      await audit(tx, req, { action: 'complication.start', patientId: treatment.patientId, targetType: 'complication', targetId: id, details: { treatmentId: treatment.id, onsetAt, signs: body.signs } });
    });
    res.status(201).json(await episodeView(db, (await loadEpisode(db, id))!));
  });

  const list = validate({ params: idParams });
  r.get('/api/patients/:id/complications', allow(...CLINICAL), list, async (req, res) => {
    const { params } = parsed(req, list);
    if (!(await db.getRepository(Patient).existsBy({ id: params.id }))) throw notFound('Patient');
    const rows = await db.getRepository(ComplicationEpisode).find({ where: { patientId: params.id }, order: { startedAt: 'DESC' } });
    await auditPatientRead(db, req, { action: 'complication.list', patientId: params.id, targetType: 'patient', targetId: params.id });
    res.json(rows.map((e) => ({ id: e.id, visitId: e.visitId, treatmentId: e.treatmentId, onsetAt: e.onsetAt, signs: JSON.parse(e.signs) as string[], outcome: e.outcome, startedAt: e.startedAt })));
  });

  r.get('/api/complications/:id', allow(...CLINICAL), list, async (req, res) => {
    const { params } = parsed(req, list);
    const e = await episodeOr404(params.id);
    await auditPatientRead(db, req, { action: 'complication.view', patientId: e.patientId, targetType: 'complication', targetId: e.id });
    res.json(await episodeView(db, e));
  });

  const update = validate({ params: idParams, body: updateEpisodeSchema });
  r.patch('/api/complications/:id', allow(...CLINICAL), update, async (req, res) => {
    const { params, body } = parsed(req, update);
    const e = await episodeOr404(params.id);
    if (body.onsetAt) notInFuture(body.onsetAt, 'onsetAt');
    const before = { onsetAt: e.onsetAt, signs: JSON.parse(e.signs), signsNotes: e.signsNotes, outcome: e.outcome, outcomeNotes: e.outcomeNotes };
    const after = {
      onsetAt: body.onsetAt ? new Date(body.onsetAt).toISOString() : e.onsetAt,
      signs: body.signs ?? before.signs,
      signsNotes: body.signsNotes ?? e.signsNotes,
      outcome: body.outcome === undefined ? e.outcome : body.outcome,
      outcomeNotes: body.outcomeNotes ?? e.outcomeNotes,
    };
    // The access log keeps every change in full: from and to, field by field.
    const changes = Object.fromEntries(
      (Object.keys(after) as (keyof typeof after)[]).filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k])).map((k) => [k, { from: before[k], to: after[k] }]),
    );
    if (Object.keys(changes).length) {
      const now = nowIso();
      await db.transaction(async (tx) => {
        await tx.getRepository(ComplicationEpisode).update(
          { id: e.id },
          { ...after, signs: JSON.stringify(after.signs), outcomeAt: 'outcome' in changes ? (after.outcome ? now : null) : e.outcomeAt, updatedAt: now },
        );
        await audit(tx, req, { action: 'complication.edit', patientId: e.patientId, targetType: 'complication', targetId: e.id, details: { changes } });
      });
    }
    res.json(await episodeView(db, (await loadEpisode(db, e.id))!));
  });

  const act = validate({ params: idParams, body: actionSchema });
  r.post('/api/complications/:id/actions', allow(...CLINICAL), act, async (req, res) => {
    const { params, body } = parsed(req, act);
    const e = await episodeOr404(params.id);
    notInFuture(body.at, 'at');
    const at = new Date(body.at).toISOString();
    const warnings: { code: string; message: string }[] = [];
    await db.transaction(async (tx) => {
      let product: Product | null = null;
      let stockLotId: string | null = null;
      let expiryDate = body.expiryDate;
      if (body.kind === 'hyaluronidase') {
        product = await tx.getRepository(Product).findOneBy({ id: body.productId! });
        if (!product || product.kind !== 'hyaluronidase') throw badRequest('Choose a hyaluronidase product from the catalogue.', [{ path: 'productId', message: 'Choose a hyaluronidase product.' }], 'NOT_HYALURONIDASE');
        const lot = await tx.getRepository(StockLot).findOneBy({ productId: product.id, lotNumber: body.lotNumber! });
        expiryDate ??= lot?.expiryDate ?? null;
        const { timeZone } = await getSettings(db, config);
        if (expiryDate && lotStatus(expiryDate, dayIn(timeZone, at)).state === 'expired') {
          throw badRequest(`This lot expired on ${expiryDate}. An expired product must not be used.`, [{ path: 'expiryDate', message: `Expired on ${expiryDate}.` }], 'LOT_EXPIRED');
        }
        if (lot) {
          stockLotId = lot.id;
          if (body.packsUsed > 0) await moveStock(tx, { lotId: lot.id, delta: -body.packsUsed, reason: 'used', episodeId: e.id, note: 'Complication episode', byId: req.user!.id });
        } else {
          warnings.push({ code: 'LOT_NOT_IN_STOCK', message: `Lot ${body.lotNumber} is not on the stock list, so no vial was taken off the shelf. Receive it in Stock to keep the count right.` });
        }
      }
      const id = newId();
      await tx.getRepository(ComplicationAction).insert({
        id,
        episodeId: e.id,
        at,
        kind: body.kind,
        description: body.description,
        productId: product?.id ?? null,
        productName: product?.name ?? null,
        unitLabel: product?.unitLabel ?? null,
        lotNumber: body.lotNumber,
        expiryDate,
        amountMilli: body.amount === null ? null : Math.round(body.amount * 1000),
        stockLotId,
        recordedById: req.user!.id,
        recordedAt: nowIso(),
      });
      await tx.getRepository(ComplicationEpisode).update({ id: e.id }, { updatedAt: nowIso() });
      await audit(tx, req, {
        action: 'complication.action',
        patientId: e.patientId,
        targetType: 'complication',
        targetId: e.id,
        details: { actionId: id, kind: body.kind, at, product: product?.name ?? null, lot: body.lotNumber, amount: body.amount, unit: product?.unitLabel ?? null, packsUsed: stockLotId ? body.packsUsed : 0, description: body.description },
      });
    });
    res.status(201).json({ ...(await episodeView(db, (await loadEpisode(db, e.id))!)), warnings });
  });

  const follow = validate({ params: idParams, body: followUpSchema });
  r.post('/api/complications/:id/follow-ups', allow(...CLINICAL), follow, async (req, res) => {
    const { params, body } = parsed(req, follow);
    const e = await episodeOr404(params.id);
    const treatment = await db.getRepository(Treatment).findOneByOrFail({ id: e.treatmentId });
    const at = new Date(body.at).toISOString();
    await db.transaction(async (tx) => {
      let visitId: string | null = null;
      if (body.bookVisit) {
        visitId = newId();
        const now = nowIso();
        // Booked with the person recording it when they are a practitioner, else with the treating practitioner.
        const practitionerId = req.user!.role === 'practitioner' ? req.user!.id : treatment.practitionerId;
        await tx.getRepository(Visit).insert({ id: visitId, patientId: e.patientId, practitionerId, startsAt: at, kind: 'follow-up', status: Date.parse(at) <= Date.now() + FUTURE_SLACK_MS ? 'in-progress' : 'booked', notes: 'Complication follow-up', createdAt: now, updatedAt: now });
        await audit(tx, req, { action: 'visit.create', patientId: e.patientId, targetType: 'visit', targetId: visitId, details: { complicationId: e.id } });
      }
      const id = newId();
      await tx.getRepository(ComplicationFollowUp).insert({ id, episodeId: e.id, visitId, at, notes: body.notes, recordedById: req.user!.id, recordedAt: nowIso() });
      await tx.getRepository(ComplicationEpisode).update({ id: e.id }, { updatedAt: nowIso() });
      await audit(tx, req, { action: 'complication.follow-up', patientId: e.patientId, targetType: 'complication', targetId: e.id, details: { followUpId: id, at, visitId } });
    });
    res.status(201).json(await episodeView(db, (await loadEpisode(db, e.id))!));
  });

  r.get('/api/complications/:id/pdf', allow(...CLINICAL), list, async (req, res) => {
    const { params } = parsed(req, list);
    const e = await episodeOr404(params.id);
    const pdf = await buildEpisodePdf(deps, e);
    await audit(db, req, { action: 'complication.pdf', patientId: e.patientId, targetType: 'complication', targetId: e.id, details: { sha256: pdf.sha256, bytes: pdf.bytes.length } });
    res.set('Content-Type', 'application/pdf');
    res.set('Content-Disposition', `attachment; filename="${pdf.fileName}"`);
    res.send(pdf.bytes);
  });
}
