import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { api, ApiError, getCsrfToken } from '../../../lib/api-client';
import type { MeasurementSeries, PairComparison, TimelinePhoto, ReviewState, StartReviewInput, Timeline } from '../types';

export const compareKeys = {
  all: ['compare'] as const,
  timelines: () => [...compareKeys.all, 'timeline'] as const,
  timeline: (patientId: string) => [...compareKeys.timelines(), patientId] as const,
  pairs: () => [...compareKeys.all, 'pair'] as const,
  pair: (patientId: string, baseline: string, followUp: string) => [...compareKeys.pairs(), { patientId, baseline, followUp }] as const,
  measurements: (patientId: string) => [...compareKeys.all, 'measurements', patientId] as const,
  review: () => [...compareKeys.all, 'review'] as const,
  images: () => [...compareKeys.all, 'image'] as const,
  /** One entry per photo, variant and format: the URL names all three. */
  image: (src: string) => [...compareKeys.images(), src] as const,
};

export const getTimeline = (patientId: string, signal?: AbortSignal) => api<Timeline>(`/api/patients/${patientId}/timeline`, { signal });
export const getPair = (patientId: string, baseline: string, followUp: string, signal?: AbortSignal) =>
  api<PairComparison>(`/api/patients/${patientId}/compare`, { query: { baseline, followUp }, signal });
/** The measurement series, or null while the server has no measurements route (never invented on the client). */
export const getMeasurements = (patientId: string, signal?: AbortSignal) =>
  api<MeasurementSeries>(`/api/patients/${patientId}/measurements`, { signal }).catch((e: unknown) => {
    if (e instanceof ApiError && e.status === 404 && e.message.startsWith('No API route')) return null;
    throw e;
  });
export const getReview = (signal?: AbortSignal) => api<ReviewState>('/api/review', { signal });
export const startReview = (patientId: string, input: StartReviewInput) => api<ReviewState>(`/api/patients/${patientId}/review`, { method: 'POST', body: input });
export const exitReview = (password: string) => api<{ active: false; patientId: string }>('/api/review/exit', { method: 'POST', body: { password } });

export const timelineQuery = (patientId: string) =>
  queryOptions({
    queryKey: compareKeys.timeline(patientId),
    queryFn: ({ signal }) => getTimeline(patientId, signal),
    // Photos still being aligned change state on the server; look again until none is.
    refetchInterval: (q) => (q.state.data?.visits.some((v) => Object.values(v.photos).some((p) => p.alignmentState === 'aligning')) ? 4000 : false),
  });
export const pairQuery = (patientId: string, baseline: string | null, followUp: string | null) =>
  queryOptions({
    queryKey: compareKeys.pair(patientId, baseline ?? '', followUp ?? ''),
    queryFn: ({ signal }) => getPair(patientId, baseline!, followUp!, signal),
    enabled: !!baseline && !!followUp && baseline !== followUp,
  });
export const measurementsQuery = (patientId: string) => queryOptions({ queryKey: compareKeys.measurements(patientId), queryFn: ({ signal }) => getMeasurements(patientId, signal) });
export const reviewQuery = () => queryOptions({ queryKey: compareKeys.review(), queryFn: ({ signal }) => getReview(signal), staleTime: Infinity });

export const useTimeline = (patientId: string) => useQuery(timelineQuery(patientId));
export const usePair = (patientId: string, baseline: string | null, followUp: string | null) => useQuery(pairQuery(patientId, baseline, followUp));
export const useMeasurements = (patientId: string) => useQuery(measurementsQuery(patientId));
export const useReview = (enabled = true) => useQuery({ ...reviewQuery(), enabled });

export function useStartReview(patientId: string) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: (input: StartReviewInput) => startReview(patientId, input), onSuccess: (state) => qc.setQueryData(compareKeys.review(), state) });
}

export function useExitReview() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: exitReview, onSuccess: () => qc.setQueryData<ReviewState>(compareKeys.review(), { active: false }) });
}

/** A photo as an image source: the aligned variant when asked for and ready, else the display variant; WebP always. */
export interface PhotoSource {
  src: string;
  width: number;
  height: number;
  aligned: boolean;
}

export function photoSource(photo: TimelinePhoto, wantAligned: boolean): PhotoSource | null {
  const pick = (variant: string) => photo.variants.find((v) => v.variant === variant && v.format === 'webp');
  const v = (wantAligned && photo.alignmentState === 'aligned' ? pick('aligned') : undefined) ?? pick('display');
  return v ? { src: v.url, width: v.width, height: v.height, aligned: v.variant === 'aligned' } : null;
}

export function thumbSource(photo: TimelinePhoto): string | null {
  return photo.variants.find((v) => v.variant === 'thumb' && v.format === 'webp')?.url ?? null;
}

/** Downloads and decodes an image, so that an <img> with the same URL paints at once from the browser's cache. */
function loadImage(src: string, signal: AbortSignal): Promise<{ src: string; width: number; height: number }> {
  const img = new Image();
  img.decoding = 'async';
  const abort = () => {
    img.src = '';
  };
  signal.addEventListener('abort', abort, { once: true });
  img.src = src;
  return img
    .decode()
    .then(() => ({ src, width: img.naturalWidth, height: img.naturalHeight }))
    .finally(() => signal.removeEventListener('abort', abort));
}

/** Per-photo image cache: a variant's bytes never change for its URL (an aligned redo carries a new revision). */
export const imageQuery = (src: string) =>
  queryOptions({ queryKey: compareKeys.image(src), queryFn: ({ signal }) => loadImage(src, signal), staleTime: Infinity, gcTime: 15 * 60_000, retry: 1 });

export const useImage = (src: string | null) => useQuery({ ...imageQuery(src ?? ''), enabled: !!src });

export function prefetchImages(qc: QueryClient, srcs: (string | null | undefined)[]) {
  for (const src of srcs) if (src) void qc.prefetchQuery(imageQuery(src));
}

/** Fetches the comparison sheet PDF and hands it to the browser as a download. */
export async function downloadComparisonSheet(patientId: string, body: unknown, fileName: string): Promise<void> {
  const res = await fetch(`/api/patients/${patientId}/comparison-sheet`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Accept: 'application/pdf', 'X-CSRF-Token': await getCsrfToken() },
    body: JSON.stringify(body),
    credentials: 'same-origin',
  });
  if (!res.ok) {
    const e = (await res.json().catch(() => null)) as { error?: { code: string; message: string; details?: unknown } } | null;
    throw new ApiError(res.status, e?.error?.code ?? `HTTP_${res.status}`, e?.error?.message ?? `The server answered ${res.status}.`, e?.error?.details);
  }
  const blob = await res.blob();
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = res.headers.get('Content-Disposition')?.match(/filename="([^"]+)"/)?.[1] ?? fileName;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export const emailComparisonSheet = (patientId: string, body: unknown) =>
  api<{ queued: true; to: string; mailId: string }>(`/api/patients/${patientId}/comparison-sheet/email`, { method: 'POST', body });
