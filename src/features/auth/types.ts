export type Role = 'admin' | 'practitioner' | 'coordinator';

export interface Me {
  id: string;
  email: string;
  name: string;
  role: Role;
}
