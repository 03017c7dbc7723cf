import type { TreatmentView } from '../../../server/features/treatments/treatments.service';
import type { ScreeningReview } from '../../../server/features/treatments/screening';
import type { Totals } from '../../../server/features/treatments/totals';
import type { ProductKind, ProductUnit, ZoneKey } from '../../../server/features/treatments/treatments.schemas';

export type { TreatmentView, ScreeningReview, Totals, ProductKind, ProductUnit, ZoneKey };
export type {
  ConsultationInput,
  ProductInput,
  TreatmentInput,
  TreatmentLineInput,
} from '../../../server/features/treatments/treatments.schemas';

export interface Product {
  id: string;
  name: string;
  kind: ProductKind;
  unit: ProductUnit;
  unitLabel: string | null;
  manufacturer: string;
  packSize: number | null;
  gtin: string | null;
  active: boolean;
}

export interface TreatmentSettings {
  highVolumeMl: number;
  lotWarnDays: number;
  reviewDays: number;
  maintenanceMonths: number;
  timeZone: string;
  limits: { fillerPerZoneMl: number; fillerPerLineMl: number; toxinPerZoneU: number; toxinPerLineU: number; linesPerTreatment: number };
}

export interface PlanStage {
  label: string;
  plannedDate: string | null;
  plannedAmountMl: number | null;
}

export interface Consultation {
  id: string;
  visitId: string;
  goals: string[];
  goalsText: string;
  targetRatio: '1:1' | '1:1.6' | '1:2' | 'custom' | null;
  customRatio: number | null;
  expectations: string;
  plan: PlanStage[];
  updatedAt: string;
}

export interface PatientTreatments {
  treatments: (TreatmentView & { cumulative: Totals })[];
  total: Totals;
}

export const TECHNIQUE_LABELS: Record<string, string> = {
  'linear-threading': 'Linear threading',
  'serial-puncture': 'Serial puncture',
  bolus: 'Bolus',
  fanning: 'Fanning',
  'vertical-tenting': 'Vertical tenting',
};
export const DEPTH_LABELS: Record<string, string> = {
  intradermal: 'Intradermal',
  subdermal: 'Subdermal',
  submucosal: 'Submucosal',
  intramuscular: 'Intramuscular',
};
export const ANAESTHETIC_LABELS: Record<string, string> = {
  none: 'None',
  topical: 'Topical cream',
  'lidocaine-in-product': 'Lidocaine in the product',
  'dental-block': 'Dental block',
  other: 'Other',
};
export const ADVERSE_EVENT_LABELS: Record<string, string> = {
  bruising: 'Bruising',
  swelling: 'Swelling',
  bleeding: 'Bleeding',
  pain: 'Pain',
  blanching: 'Blanching',
  vasovagal: 'Vasovagal episode',
  other: 'Other',
};
export const GOAL_LABELS: Record<string, string> = {
  'border-definition': 'More definition of the border',
  'more-volume': 'More volume',
  'cupids-bow-definition': "A more defined cupid's bow",
  eversion: 'Eversion of an inverted lip',
  'corner-support': 'Support for down-turned corners',
  symmetry: 'Better symmetry',
  hydration: 'Hydration / smoother surface',
};
