import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** One client's hit counter in one rate-limit window, shared by every app instance through the database. */
@Entity('rate_limit')
@Index(['resetAt'])
export class RateLimitHit {
  /** The limiter's prefix and the client key, e.g. "verify:203.0.113.7". */
  @PrimaryColumn('varchar', { length: 200 })
  key: string;

  @Column('integer')
  hits: number;

  /** When the window ends (UTC ISO). */
  @Column('varchar', { length: 30 })
  resetAt: string;
}
