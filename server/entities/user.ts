import { Column, Entity, PrimaryColumn } from 'typeorm';

export const ROLES = ['admin', 'practitioner', 'coordinator'] as const;
export type Role = (typeof ROLES)[number];

@Entity('user')
export class User {
  @PrimaryColumn('varchar', { length: 36 })
  id: string;

  @Column('varchar', { length: 254, unique: true })
  email: string;

  @Column('varchar', { length: 120 })
  name: string;

  @Column('varchar', { length: 20 })
  role: Role;

  @Column('varchar', { length: 255 })
  passwordHash: string;

  @Column('boolean', { default: true })
  active: boolean;

  @Column('varchar', { length: 30 })
  createdAt: string;

  @Column('varchar', { length: 30 })
  updatedAt: string;

  /** Sign-ins before this instant are no longer honoured (password reset, role change, deactivation, sign-out everywhere). */
  @Column('varchar', { length: 30, nullable: true })
  sessionsValidFrom: string | null;
}
