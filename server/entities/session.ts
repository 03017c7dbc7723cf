import { Column, DeleteDateColumn, Entity, Index, PrimaryColumn } from 'typeorm';
import type { ISession } from 'connect-typeorm';

/** express-session rows, stored by connect-typeorm. */
@Entity('session')
export class Session implements ISession {
  @Index()
  @Column('bigint')
  expiredAt = Date.now();

  @PrimaryColumn('varchar', { length: 255 })
  id = '';

  @Column('text')
  json = '';

  @DeleteDateColumn({ type: 'datetime', nullable: true })
  destroyedAt?: Date;
}
