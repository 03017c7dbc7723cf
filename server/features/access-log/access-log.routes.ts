import type { Response, Router } from 'express';
import type { DataSource, SelectQueryBuilder } from 'typeorm';
import { allow } from '../../auth/access.js';
import { readPoolFor } from '../../db/read-pool.js';
import type { Deps } from '../../deps.js';
import { AuditEvent } from '../../entities/audit-event.js';
import { audit, auditListRead } from '../../lib/audit.js';
import { dayBoundsUtc } from '../../lib/time.js';
import { parsed, validate } from '../../lib/validate.js';
import { getSettings } from '../settings/settings.service.js';
import { ACCESS_LOG_COUNT_CAP, accessLogQuerySchema } from './access-log.schemas.js';

type Filters = { userId?: string; patientId?: string; action?: string; from?: string; to?: string };
type Row = Record<string, string | null> & { at: string; id: string };
type Position = { at: string; id: string };

/** The first string after every string that starts with `prefix` (action names are plain ASCII). */
const prefixEnd = (prefix: string) => prefix.slice(0, -1) + String.fromCharCode(prefix.charCodeAt(prefix.length - 1) + 1);

/**
 * The access log's filters, on `audit_event` alone; `from`/`to` are whole days in the clinic's time zone. Every
 * filter is a range on an indexed column (the action prefix too, as a range rather than LIKE).
 */
function matching(db: DataSource, f: Filters, timeZone: string): SelectQueryBuilder<AuditEvent> {
  const qb = db.getRepository(AuditEvent).createQueryBuilder('e');
  if (f.userId) qb.andWhere('e.actorId = :userId', { userId: f.userId });
  if (f.patientId) qb.andWhere('e.patientId = :patientId', { patientId: f.patientId });
  if (f.action) qb.andWhere('e.action >= :action AND e.action < :actionEnd', { action: f.action, actionEnd: prefixEnd(f.action) });
  if (f.from) qb.andWhere('e.at >= :from', { from: dayBoundsUtc(f.from, timeZone).start });
  if (f.to) qb.andWhere('e.at < :to', { to: dayBoundsUtc(f.to, timeZone).end });
  return qb;
}

/** The entries with the names a reader needs, in keyset order from `position` (exclusive): newest first unless `up`. */
function entries(qb: SelectQueryBuilder<AuditEvent>, position: Position | null, up: boolean): SelectQueryBuilder<AuditEvent> {
  const q = qb
    .clone()
    .leftJoin('user', 'u', 'u.id = e.actorId')
    .leftJoin('patient', 'p', 'p.id = e.patientId')
    .select(['e.id AS id', 'e.at AS at', 'e.actorId AS actorId', 'e.actorRole AS actorRole', 'e.action AS action', 'e.patientId AS patientId'])
    .addSelect(['e.targetType AS targetType', 'e.targetId AS targetId', 'e.ip AS ip', 'e.userAgent AS userAgent', 'e.details AS details'])
    .addSelect('u.name', 'actorName')
    .addSelect("p.firstName || ' ' || p.lastName", 'patientName')
    .addSelect('p.code', 'patientCode');
  if (position) {
    // The plain range on "at" lets the index do the work; the id breaks ties between entries of the same instant.
    q.andWhere(up ? 'e.at >= :pAt AND (e.at > :pAt OR e.id > :pId)' : 'e.at <= :pAt AND (e.at < :pAt OR e.id < :pId)', { pAt: position.at, pId: position.id });
  }
  const dir = up ? 'ASC' : 'DESC';
  return q.orderBy('e.at', dir).addOrderBy('e.id', dir);
}

const positionOf = (cursor: string | undefined): Position | null => {
  if (!cursor) return null;
  const i = cursor.lastIndexOf('_');
  return { at: cursor.slice(0, i), id: cursor.slice(i + 1) };
};
const cursorOf = (r: Pick<Row, 'at' | 'id'>) => `${r.at}_${r.id}`;

const CSV_COLUMNS = ['at', 'actorName', 'actorRole', 'action', 'patientCode', 'patientName', 'targetType', 'targetId', 'ip', 'userAgent', 'details'] as const;
/** Rows per read of the export: big enough that the worker stays busy, small enough to stream steadily. */
const CSV_BATCH = 5000;

/** Resolves when `res` can take more (or has closed); false when the client has gone. */
function writeWhenReady(res: Response, text: string): Promise<boolean> {
  if (res.destroyed || res.writableEnded) return Promise.resolve(false);
  if (res.write(text)) return Promise.resolve(true);
  return new Promise((resolve) => {
    const done = (ok: boolean) => () => {
      res.off('drain', onDrain);
      res.off('close', onClose);
      resolve(ok);
    };
    const onDrain = done(true);
    const onClose = done(false);
    res.once('drain', onDrain);
    res.once('close', onClose);
  });
}

export function registerAccessLogRoutes(r: Router, { db, config }: Deps): void {
  const list = validate({ query: accessLogQuerySchema });
  const reads = readPoolFor(db);

  r.get('/api/access-log', allow('admin'), list, async (req, res) => {
    const { query } = parsed(req, list);
    const { timeZone } = await getSettings(db, config);
    const qb = matching(db, query, timeZone);
    const up = Boolean(query.after);
    const [pageSql, pageParams] = entries(qb, positionOf(query.after ?? query.before), up).limit(query.pageSize + 1).getQueryAndParameters();
    const [countSql, countParams] = qb.clone().select('1').limit(ACCESS_LOG_COUNT_CAP + 1).getQueryAndParameters();
    const [rows, counted] = await Promise.all([
      reads.rows<Row>(pageSql, pageParams),
      reads.rows<{ n: number }>(`SELECT count(*) AS n FROM (${countSql}) capped`, countParams),
    ]);
    const more = rows.length > query.pageSize;
    const items = rows.slice(0, query.pageSize);
    if (up) items.reverse();
    const n = Number(counted[0].n);
    // Logged after the read, so the page shown does not list its own entry.
    await auditListRead(db, req, 'access-log');
    res.json({
      items: items.map((i) => ({ ...i, details: JSON.parse(i.details ?? '{}') })),
      total: Math.min(n, ACCESS_LOG_COUNT_CAP),
      totalIsAtLeast: n > ACCESS_LOG_COUNT_CAP,
      // A page reached from a neighbour always has that neighbour on its other side.
      newer: items.length && (up ? more : Boolean(query.before)) ? cursorOf(items[0]) : null,
      older: items.length && (up || more) ? cursorOf(items[items.length - 1]) : null,
      pageSize: query.pageSize,
    });
  });

  /** The whole filtered log, newest first, streamed: each batch is read by keyset after the last, and read only when the client has taken the one before. */
  r.get('/api/access-log.csv', allow('admin'), list, async (req, res) => {
    const { query } = parsed(req, list);
    const { timeZone } = await getSettings(db, config);
    await audit(db, req, { action: 'access_log.export', details: { filters: { ...query, before: undefined, after: undefined, pageSize: undefined } } });
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="access-log-${new Date().toISOString().slice(0, 10)}.csv"`);
    const qb = matching(db, query, timeZone);
    const batch = (after: Position | null) => {
      const [sql, params] = entries(qb, after, false).limit(CSV_BATCH).getQueryAndParameters();
      return reads.csv<Row>(sql, params, CSV_COLUMNS);
    };
    let open = await writeWhenReady(res, `${CSV_COLUMNS.join(',')}\r\n`);
    let current = await batch(null);
    while (open) {
      // The next batch is read while this one is written out.
      const next = current.count === CSV_BATCH && current.last ? batch(current.last) : null;
      next?.catch(() => undefined);
      open = await writeWhenReady(res, current.text);
      if (!next) break;
      current = await next;
    }
    if (open) res.end();
  });
}
