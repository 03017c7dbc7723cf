import { rateLimit, type ClientRateLimitInfo, type Options, type Store } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import { LessThan, type DataSource } from 'typeorm';
import { RateLimitHit } from '../entities/rate-limit.js';
import { HttpError } from './errors.js';

/**
 * An express-rate-limit store in the database: the counters are shared by every app instance (an in-memory store
 * would let N instances allow N times the limit). Each hit is one short transaction; on PostgreSQL two instances
 * racing on a fresh window may both start it at 1, which can let a client one or two hits over: fine for a limit.
 */
export class DatabaseRateStore implements Store {
  localKeys = false;
  prefix: string;
  private windowMs = 60_000;

  constructor(
    private readonly db: DataSource,
    prefix: string,
  ) {
    this.prefix = `${prefix}:`;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const row = await this.db.getRepository(RateLimitHit).findOneBy({ key: this.prefix + key });
    return row && row.resetAt > new Date().toISOString() ? { totalHits: row.hits, resetTime: new Date(row.resetAt) } : undefined;
  }

  increment(key: string): Promise<ClientRateLimitInfo> {
    const id = this.prefix + key;
    return this.db.transaction(async (tx) => {
      const repo = tx.getRepository(RateLimitHit);
      const now = new Date();
      const row = await repo.findOneBy({ key: id });
      if (row && row.resetAt > now.toISOString()) {
        await repo.increment({ key: id }, 'hits', 1);
        return { totalHits: row.hits + 1, resetTime: new Date(row.resetAt) };
      }
      const resetAt = new Date(now.getTime() + this.windowMs).toISOString();
      // Windows that ended are dropped when a new one starts, so the table holds only live counters.
      await repo.delete({ resetAt: LessThan(now.toISOString()) });
      await repo.upsert({ key: id, hits: 1, resetAt }, ['key']);
      return { totalHits: 1, resetTime: new Date(resetAt) };
    });
  }

  async decrement(key: string): Promise<void> {
    await this.db.getRepository(RateLimitHit).decrement({ key: this.prefix + key }, 'hits', 1);
  }

  async resetKey(key: string): Promise<void> {
    await this.db.getRepository(RateLimitHit).delete({ key: this.prefix + key });
  }
}

/**
 * A per-address limit on a route: RateLimit and Retry-After headers from express-rate-limit, counters in the
 * database, and a refusal in the API's error shape. `onLimited` runs before the refusal (e.g. to log it).
 */
export function limitPerAddress(
  db: DataSource,
  opts: { name: string; limit: number; windowMinutes: number; message: string; onLimited?: (req: Parameters<RequestHandler>[0]) => Promise<void> },
): RequestHandler {
  return rateLimit({
    windowMs: opts.windowMinutes * 60_000,
    limit: opts.limit,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    store: new DatabaseRateStore(db, opts.name),
    handler: (req, _res, next) => {
      const refuse = () => next(new HttpError(429, 'RATE_LIMITED', opts.message, { retryAfterMinutes: opts.windowMinutes }));
      if (!opts.onLimited) return refuse();
      opts.onLimited(req).then(refuse, next);
    },
  });
}
