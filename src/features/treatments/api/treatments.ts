import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError, getCsrfToken, resetCsrf } from '../../../lib/api-client';
import type {
  Consultation,
  ConsultationInput,
  PatientTreatments,
  Product,
  ProductInput,
  ScreeningReview,
  TreatmentInput,
  TreatmentSettings,
  TreatmentView,
} from '../types';

export const treatmentKeys = {
  all: ['treatments'] as const,
  settings: () => [...treatmentKeys.all, 'settings'] as const,
  products: (all: boolean) => [...treatmentKeys.all, 'products', { all }] as const,
  productLists: () => [...treatmentKeys.all, 'products'] as const,
  visit: (visitId: string) => [...treatmentKeys.all, 'visit', visitId] as const,
  patient: (patientId: string) => [...treatmentKeys.all, 'patient', patientId] as const,
  patients: () => [...treatmentKeys.all, 'patient'] as const,
  screening: (visitId: string) => [...treatmentKeys.all, 'screening', visitId] as const,
  consultation: (visitId: string) => [...treatmentKeys.all, 'consultation', visitId] as const,
  /** Reminders and open items: they change whenever a treatment or a screening review is saved. */
  followUps: () => [...treatmentKeys.all, 'follow-ups'] as const,
  reminders: (from: string, to: string) => [...treatmentKeys.followUps(), 'reminders', { from, to }] as const,
  openItems: (date: string) => [...treatmentKeys.followUps(), 'open-items', date] as const,
  referencePictures: (patientId: string) => [...treatmentKeys.all, 'reference-pictures', patientId] as const,
};

/** A 404 means "nothing recorded yet", which the screens show as an empty form. */
const orNull = async <T,>(p: Promise<T>): Promise<T | null> => {
  try {
    return await p;
  } catch (e) {
    if (e instanceof ApiError && e.status === 404 && e.code === 'NOT_FOUND' && !/Visit/.test(e.message)) return null;
    throw e;
  }
};

export const getTreatmentSettings = (signal?: AbortSignal) => api<TreatmentSettings>('/api/treatment-settings', { signal });
export const getProducts = (all: boolean, signal?: AbortSignal) => api<Product[]>('/api/products', { query: { all: all ? '1' : undefined }, signal });
export const createProduct = (input: ProductInput) => api<Product>('/api/products', { method: 'POST', body: input });
export const updateProduct = (id: string, input: Partial<Pick<Product, 'name' | 'manufacturer' | 'packSize' | 'active'>>) =>
  api<Product>(`/api/products/${id}`, { method: 'PATCH', body: input });
export const getTreatment = (visitId: string, signal?: AbortSignal) => orNull(api<TreatmentView>(`/api/visits/${visitId}/treatment`, { signal }));
export const saveTreatment = (visitId: string, input: TreatmentInput) => api<TreatmentView>(`/api/visits/${visitId}/treatment`, { method: 'PUT', body: input });
export const getPatientTreatments = (patientId: string, signal?: AbortSignal) => api<PatientTreatments>(`/api/patients/${patientId}/treatments`, { signal });
export const getScreening = (visitId: string, signal?: AbortSignal) => api<{ screening: ScreeningReview | null }>(`/api/visits/${visitId}/screening`, { signal });
export const acknowledgeFlags = (visitId: string, body: { consentId: string; notes: { questionId: string; note: string }[] }) =>
  api<{ screening: ScreeningReview | null }>(`/api/visits/${visitId}/screening/acknowledge`, { method: 'POST', body });
export const getConsultation = (visitId: string, signal?: AbortSignal) => orNull(api<Consultation>(`/api/visits/${visitId}/consultation`, { signal }));
export const saveConsultation = (visitId: string, input: ConsultationInput) => api<Consultation>(`/api/visits/${visitId}/consultation`, { method: 'PUT', body: input });

export const treatmentSettingsQuery = () => queryOptions({ queryKey: treatmentKeys.settings(), queryFn: ({ signal }) => getTreatmentSettings(signal), staleTime: 5 * 60_000 });
export const productsQuery = (all = false) => queryOptions({ queryKey: treatmentKeys.products(all), queryFn: ({ signal }) => getProducts(all, signal), staleTime: 60_000 });
export const treatmentQuery = (visitId: string) => queryOptions({ queryKey: treatmentKeys.visit(visitId), queryFn: ({ signal }) => getTreatment(visitId, signal) });
export const patientTreatmentsQuery = (patientId: string) => queryOptions({ queryKey: treatmentKeys.patient(patientId), queryFn: ({ signal }) => getPatientTreatments(patientId, signal) });
export const screeningQuery = (visitId: string) => queryOptions({ queryKey: treatmentKeys.screening(visitId), queryFn: ({ signal }) => getScreening(visitId, signal) });
export const consultationQuery = (visitId: string) => queryOptions({ queryKey: treatmentKeys.consultation(visitId), queryFn: ({ signal }) => getConsultation(visitId, signal) });

export const useTreatmentSettings = () => useQuery(treatmentSettingsQuery());
export const useProducts = (all = false) => useQuery(productsQuery(all));
export const useTreatment = (visitId: string) => useQuery(treatmentQuery(visitId));
export const usePatientTreatments = (patientId: string) => useQuery(patientTreatmentsQuery(patientId));
export const useScreening = (visitId: string) => useQuery(screeningQuery(visitId));
export const useConsultation = (visitId: string) => useQuery(consultationQuery(visitId));

export function useSaveTreatment(visitId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: TreatmentInput) => saveTreatment(visitId, input),
    onSuccess: (t) => {
      qc.setQueryData(treatmentKeys.visit(visitId), t);
      // Reminders and open items of the clinic day change with the record.
      return Promise.all([qc.invalidateQueries({ queryKey: treatmentKeys.patients() }), qc.invalidateQueries({ queryKey: treatmentKeys.followUps() })]);
    },
  });
}

export function useAcknowledgeFlags(visitId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { consentId: string; notes: { questionId: string; note: string }[] }) => acknowledgeFlags(visitId, body),
    onSuccess: (r) => {
      qc.setQueryData(treatmentKeys.screening(visitId), r);
      // The consent records and the visit's open items show the same acknowledgement; they belong to other
      // features, whose keys this one does not know, so everything on screen is refreshed.
      return qc.invalidateQueries();
    },
  });
}

export function useSaveConsultation(visitId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ConsultationInput) => saveConsultation(visitId, input),
    onSuccess: (c) => qc.setQueryData(treatmentKeys.consultation(visitId), c),
  });
}

export function useCreateProduct() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: createProduct, onSuccess: () => qc.invalidateQueries({ queryKey: treatmentKeys.productLists() }) });
}

export function useUpdateProduct() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: { id: string } & Parameters<typeof updateProduct>[1]) => updateProduct(id, input),
    onSuccess: () => qc.invalidateQueries({ queryKey: treatmentKeys.productLists() }),
  });
}

export interface ReminderView {
  id: string;
  kind: 'review' | 'maintenance';
  dueOn: string;
  dueAt: string;
  state: 'scheduled' | 'sent' | 'cancelled';
  sentAt: string | null;
  cancelledAt: string | null;
  cancelReason: string | null;
  visitId: string;
  patient: { id: string; code: string; firstName: string; lastName: string; hasEmail: boolean } | null;
  mail: { state: string; sentAt: string | null } | null;
}

export interface OpenItem {
  type: string;
  message: string;
  count?: number;
}

export interface ClinicDayFollowUps {
  date: string;
  visits: { visitId: string; ready: boolean; items: OpenItem[] }[];
  overdueReviews: { patient: { id: string; code: string; firstName: string; lastName: string; phone: string | null }; treatmentVisitId: string; treatedOn: string; dueOn: string }[];
}

export const getReminders = (from: string, to: string, signal?: AbortSignal) => api<{ from: string; to: string; reminders: ReminderView[] }>('/api/reminders', { query: { from, to }, signal });
export const cancelReminder = (id: string, reason: string) => api<ReminderView>(`/api/reminders/${id}/cancel`, { method: 'POST', body: { reason } });
export const getOpenItems = (date: string, signal?: AbortSignal) => api<ClinicDayFollowUps>('/api/clinic-day/open-items', { query: { date }, signal });

export const remindersQuery = (from: string, to: string) => queryOptions({ queryKey: treatmentKeys.reminders(from, to), queryFn: ({ signal }) => getReminders(from, to, signal), refetchInterval: 60_000 });
export const openItemsQuery = (date: string) => queryOptions({ queryKey: treatmentKeys.openItems(date), queryFn: ({ signal }) => getOpenItems(date, signal), refetchInterval: 60_000 });

export const useReminders = (from: string, to: string) => useQuery(remindersQuery(from, to));
export const useOpenItems = (date: string) => useQuery(openItemsQuery(date));

export function useCancelReminder() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, reason }: { id: string; reason: string }) => cancelReminder(id, reason),
    onSuccess: () => qc.invalidateQueries({ queryKey: treatmentKeys.followUps() }),
  });
}

export interface ReferencePictureView {
  id: string;
  patientId: string;
  visitId: string | null;
  caption: string;
  width: number;
  height: number;
  uploadedAt: string;
}

export const referencePictureUrl = (id: string, variant: 'display' | 'thumb') => `/api/reference-pictures/${id}/file?variant=${variant}`;
export const getReferencePictures = (patientId: string, signal?: AbortSignal) => api<ReferencePictureView[]>(`/api/patients/${patientId}/reference-pictures`, { signal });
export const removeReferencePicture = (id: string) => api<void>(`/api/reference-pictures/${id}`, { method: 'DELETE' });

/** Multipart upload of one picture (fetch: no progress bar needed for a small reference picture). */
export async function uploadReferencePicture(patientId: string, input: { file: File; caption: string; visitId?: string }): Promise<ReferencePictureView> {
  const send = async (retry: boolean): Promise<ReferencePictureView> => {
    const form = new FormData();
    form.append('caption', input.caption);
    if (input.visitId) form.append('visitId', input.visitId);
    form.append('picture', input.file, input.file.name);
    const res = await fetch(`/api/patients/${patientId}/reference-pictures`, {
      method: 'POST',
      headers: { 'X-CSRF-Token': await getCsrfToken(), Accept: 'application/json' },
      body: form,
      credentials: 'same-origin',
    });
    const body = (await res.json().catch(() => null)) as { error?: { code: string; message: string; details?: unknown } } | ReferencePictureView | null;
    if (res.ok) return body as ReferencePictureView;
    const e = (body as { error?: { code: string; message: string; details?: unknown } } | null)?.error;
    const err = new ApiError(res.status, e?.code ?? `HTTP_${res.status}`, e?.message ?? `The server answered ${res.status}.`, e?.details);
    if (err.code === 'CSRF_INVALID' && retry) {
      resetCsrf();
      return send(false);
    }
    throw err;
  };
  return send(true);
}

export const referencePicturesQuery = (patientId: string) =>
  queryOptions({ queryKey: treatmentKeys.referencePictures(patientId), queryFn: ({ signal }) => getReferencePictures(patientId, signal) });
export const useReferencePictures = (patientId: string) => useQuery(referencePicturesQuery(patientId));

export function useUploadReferencePicture(patientId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { file: File; caption: string; visitId?: string }) => uploadReferencePicture(patientId, input),
    onSuccess: () => qc.invalidateQueries({ queryKey: treatmentKeys.referencePictures(patientId) }),
  });
}

export function useRemoveReferencePicture(patientId: string) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: removeReferencePicture, onSuccess: () => qc.invalidateQueries({ queryKey: treatmentKeys.referencePictures(patientId) }) });
}
