import type { ROLE_VALUES } from '../../../server/features/users/users.schemas';

export type Role = (typeof ROLE_VALUES)[number];

export interface StaffUser {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  createdAt: string;
}

export const ROLE_LABEL: Record<Role, string> = { admin: 'Admin', practitioner: 'Practitioner', coordinator: 'Coordinator' };
