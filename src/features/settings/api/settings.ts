import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { SettingsUpdate } from '../../../../server/features/settings/settings.schemas';

export interface ClinicSettings {
  clinicName: string;
  timeZone: string;
  idleMinutes: number;
  sessionHours: number;
  reviewReminderDays: number;
  maintenanceReminderMonths: number;
  retentionYears: number;
  watermarkText: string;
  showcaseCaption: string;
  complicationProtocol: string;
  prescriberRequired: boolean;
  treatmentCardEmail: boolean;
  toxinMaintenanceMonths: number;
  updatedAt: string;
}

export const settingsKeys = { all: ['settings'] as const, detail: () => [...settingsKeys.all, 'detail'] as const };

export const getSettings = (signal?: AbortSignal) => api<ClinicSettings>('/api/settings', { signal });
export const updateSettings = (input: SettingsUpdate) => api<ClinicSettings>('/api/settings', { method: 'PATCH', body: input });

export const settingsQuery = () => queryOptions({ queryKey: settingsKeys.detail(), queryFn: ({ signal }) => getSettings(signal), staleTime: 60_000 });
export const useSettings = () => useQuery(settingsQuery());

export function useUpdateSettings() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: updateSettings, onSuccess: (s) => qc.setQueryData(settingsKeys.detail(), s) });
}
