import type { Router } from 'express';
import type { DataSource } from 'typeorm';
import { allow } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { AuditEvent } from '../../entities/audit-event.js';
import { dayBoundsUtc } from '../../lib/time.js';
import { audit, auditListRead } from '../../lib/audit.js';
import { parsed, validate } from '../../lib/validate.js';
import { getSettings } from '../settings/settings.service.js';
import { accessLogQuerySchema } from './access-log.schemas.js';

type Filters = { userId?: string; patientId?: string; action?: string; from?: string; to?: string };

/** The access log filtered, newest first; `from`/`to` are whole days in the clinic's time zone. */
function filtered(db: DataSource, f: Filters, timeZone: string) {
  const qb = db
    .getRepository(AuditEvent)
    .createQueryBuilder('e')
    .leftJoin('user', 'u', 'u.id = e.actorId')
    .leftJoin('patient', 'p', 'p.id = e.patientId')
    .select('e.id', 'id')
    .addSelect(['e.at AS at', 'e.actorId AS actorId', 'e.actorRole AS actorRole', 'e.action AS action', 'e.patientId AS patientId', 'e.targetType AS targetType', 'e.targetId AS targetId', 'e.ip AS ip', 'e.userAgent AS userAgent', 'e.details AS details'])
    .addSelect('u.name', 'actorName')
    .addSelect("p.firstName || ' ' || p.lastName", 'patientName')
    .addSelect('p.code', 'patientCode');
  if (f.userId) qb.andWhere('e.actorId = :userId', { userId: f.userId });
  if (f.patientId) qb.andWhere('e.patientId = :patientId', { patientId: f.patientId });
  if (f.action) qb.andWhere('e.action LIKE :action', { action: `${f.action}%` });
  if (f.from) qb.andWhere('e.at >= :from', { from: dayBoundsUtc(f.from, timeZone).start });
  if (f.to) qb.andWhere('e.at < :to', { to: dayBoundsUtc(f.to, timeZone).end });
  return qb.orderBy('e.at', 'DESC').addOrderBy('e.id', 'DESC');
}

type Row = Record<string, string | null>;

const CSV_COLUMNS = ['at', 'actorName', 'actorRole', 'action', 'patientCode', 'patientName', 'targetType', 'targetId', 'ip', 'userAgent', 'details'] as const;

/** RFC 4180 field quoting, and a leading quote on values a spreadsheet would run as a formula. */
function csvField(value: string | null | undefined): string {
  let s = value ?? '';
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function registerAccessLogRoutes(r: Router, { db, config }: Deps): void {
  const list = validate({ query: accessLogQuerySchema });

  r.get('/api/access-log', allow('admin'), list, async (req, res) => {
    const { query } = parsed(req, list);
    const { timeZone } = await getSettings(db, config);
    const qb = filtered(db, query, timeZone);
    const total = await qb.clone().getCount();
    const items = (await qb.offset((query.page - 1) * query.pageSize).limit(query.pageSize).getRawMany()) as Row[];
    // Logged after the read, so the page shown does not list its own entry.
    await auditListRead(db, req, 'access-log');
    res.json({ items: items.map((i) => ({ ...i, details: JSON.parse(i.details ?? '{}') })), total, page: query.page, pageSize: query.pageSize });
  });

  r.get('/api/access-log.csv', allow('admin'), list, async (req, res) => {
    const { query } = parsed(req, list);
    const { timeZone } = await getSettings(db, config);
    await audit(db, req, { action: 'access_log.export', details: { filters: { ...query, page: undefined, pageSize: undefined } } });
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="access-log-${new Date().toISOString().slice(0, 10)}.csv"`);
    res.write(`${CSV_COLUMNS.join(',')}\r\n`);
    const qb = filtered(db, query, timeZone);
    const batch = 1000;
    for (let offset = 0; ; offset += batch) {
      const rows = (await qb.clone().offset(offset).limit(batch).getRawMany()) as Row[];
      for (const row of rows) res.write(`${CSV_COLUMNS.map((c) => csvField(row[c])).join(',')}\r\n`);
      if (rows.length < batch) break;
    }
    res.end();
  });
}
