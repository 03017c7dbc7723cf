export type ShowcaseChannel = 'clinic-website' | 'social-media' | 'print' | 'professional-education';
export type ShowcaseState = 'requested' | 'cleared' | 'declined' | 'withdrawn';

export const CHANNELS: { key: ShowcaseChannel; label: string }[] = [
  { key: 'clinic-website', label: 'Clinic website' },
  { key: 'social-media', label: 'Social media' },
  { key: 'print', label: 'Print' },
  { key: 'professional-education', label: 'Professional education' },
];
export const channelLabel = (c: string) => CHANNELS.find((x) => x.key === c)?.label ?? c;

export interface ShowcaseExport {
  id: string;
  channel: ShowcaseChannel;
  exportedAt: string;
  exportedById: string;
  files: { name: string; sha256: string; bytes: number; width: number; height: number; url: string }[];
}

export interface ShowcaseRequest {
  id: string;
  patientId: string;
  viewKey: string;
  photoIds: string[];
  channels: ShowcaseChannel[];
  crop: 'face' | 'lips-only';
  state: ShowcaseState;
  requestNote: string;
  requestedAt: string;
  requestedByName: string | null;
  decidedAt: string | null;
  decidedByName: string | null;
  decisionNote: string | null;
  withdrawnAt: string | null;
  withdrawnReason: string | null;
  patient: { id: string; code: string; firstName: string; lastName: string } | null;
  consent: { id: string; templateVersion: number; signedAt: string; channels: ShowcaseChannel[]; crop: 'face' | 'lips-only'; withdrawnAt: string | null } | null;
  photos: { id: string; thumbUrl: string; displayUrl: string }[];
  exports: ShowcaseExport[];
}

export interface PatientShowcase {
  consent: { id: string; templateVersion: number; signedAt: string; channels: ShowcaseChannel[]; crop: 'face' | 'lips-only' } | null;
  requests: ShowcaseRequest[];
}

export interface PatientPhoto {
  id: string;
  visitId: string;
  viewKey: string;
  state: string;
  capturedAt: string;
  variants: { variant: string; format: string; url: string }[];
}

export const viewLabel = (key: string) => key.replace(/-/g, ' ').replace(/^./, (c) => c.toUpperCase()).replace('Lips ', 'Lips close-up ');
