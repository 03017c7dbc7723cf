import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** A failed sign-in, kept for lockout decisions (by e-mail and by address). */
@Entity('login_failure')
@Index(['email', 'at'])
@Index(['ip', 'at'])
export class LoginFailure {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 254 })
  email: string;

  @Column('varchar', { length: 64 })
  ip: string;

  @Column('varchar', { length: 30 })
  at: string;
}
