export type VisitKind = 'consultation' | 'treatment' | 'review' | 'follow-up';
export type VisitStatus = 'booked' | 'in-progress' | 'completed' | 'cancelled';

export interface Visit {
  id: string;
  patientId: string;
  practitionerId: string;
  practitionerName: string | null;
  startsAt: string;
  kind: VisitKind;
  status: VisitStatus;
  /** The shot list whose views are photographed at this visit. */
  shotListId: string;
  notes?: string;
  patient?: { id: string; code: string; firstName: string; lastName: string };
  createdAt: string;
  updatedAt: string;
}

export interface Practitioner {
  id: string;
  name: string;
  role: string;
}

export interface ClinicDay {
  date: string;
  timeZone: string;
  practitioners: { practitionerId: string; practitionerName: string; visits: Visit[] }[];
}

export const KIND_LABEL: Record<VisitKind, string> = {
  consultation: 'Consultation',
  treatment: 'Treatment',
  review: 'Review',
  'follow-up': 'Follow-up',
};

export const STATUS_LABEL: Record<VisitStatus, string> = {
  booked: 'Booked',
  'in-progress': 'In progress',
  completed: 'Completed',
  cancelled: 'Cancelled',
};
