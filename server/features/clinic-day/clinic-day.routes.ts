import type { Router } from 'express';
import { auditListRead } from '../../lib/audit.js';
import { z } from 'zod';
import { allow, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { Visit } from '../../entities/visit.js';
import { dayBoundsUtc, dayIn } from '../../lib/time.js';
import { getSettings } from '../settings/settings.service.js';
import { parsed, validate } from '../../lib/validate.js';
import { openItemsForVisits, overdueReviews } from './open-items.js';

const query = z.object({ date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.').optional() }).strict();

/** Open items of every visit of a clinic day, and the reviews the front desk should chase. */
export function registerClinicDayRoutes(r: Router, { db, config }: Deps): void {
  const day = validate({ query });
  r.get('/api/clinic-day/open-items', allow(...STAFF), day, async (req, res) => {
    const { query: q } = parsed(req, day);
    const { timeZone } = await getSettings(db, config);
    const date = q.date ?? dayIn(timeZone);
    const { start, end } = dayBoundsUtc(date, timeZone);
    // The same screen as the clinic day's visit list: one entry covers both.
    await auditListRead(db, req, 'clinic-day', { date });
    const visits = await db
      .getRepository(Visit)
      .createQueryBuilder('v')
      .where('v.startsAt >= :start AND v.startsAt < :end', { start, end })
      .orderBy('v.startsAt', 'ASC')
      .getMany();
    res.json({ date, visits: await openItemsForVisits(db, req, visits, date), overdueReviews: await overdueReviews(db, date) });
  });
}
