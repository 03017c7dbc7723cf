export type Role = 'admin' | 'practitioner' | 'coordinator';

export interface Me {
  id: string;
  email: string;
  name: string;
  role: Role;
  /** Minutes without activity before Twinframe signs out (automatic logoff). */
  idleMinutes?: number;
}
