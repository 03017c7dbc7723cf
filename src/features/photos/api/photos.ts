import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, ApiError, getCsrfToken, resetCsrf } from '../../../lib/api-client';
import type { PatientPhotoDto, PhotoDto } from '../types';

export const photoKeys = {
  all: ['photos'] as const,
  lists: () => [...photoKeys.all, 'list'] as const,
  visit: (visitId: string, all: boolean) => [...photoKeys.lists(), 'visit', visitId, { all }] as const,
  visits: () => [...photoKeys.lists(), 'visit'] as const,
  patient: (patientId: string, all: boolean) => [...photoKeys.lists(), 'patient', patientId, { all }] as const,
  details: () => [...photoKeys.all, 'detail'] as const,
  detail: (id: string) => [...photoKeys.details(), id] as const,
};

export const getVisitPhotos = (visitId: string, all: boolean, signal?: AbortSignal) =>
  api<PhotoDto[]>(`/api/visits/${visitId}/photos`, { query: { all: all ? 1 : undefined }, signal });
export const getPatientPhotos = (patientId: string, all: boolean, signal?: AbortSignal) =>
  api<PatientPhotoDto[]>(`/api/patients/${patientId}/photos`, { query: { all: all ? 1 : undefined }, signal });

export const visitPhotosQuery = (visitId: string, all = false) =>
  queryOptions({ queryKey: photoKeys.visit(visitId, all), queryFn: ({ signal }) => getVisitPhotos(visitId, all, signal) });
export const patientPhotosQuery = (patientId: string, all = false) =>
  queryOptions({ queryKey: photoKeys.patient(patientId, all), queryFn: ({ signal }) => getPatientPhotos(patientId, all, signal) });

export const useVisitPhotos = (visitId: string, all = false) => useQuery(visitPhotosQuery(visitId, all));
export const usePatientPhotos = (patientId: string, all = false, enabled = true) => useQuery({ ...patientPhotosQuery(patientId, all), enabled });

export interface UploadInput {
  visitId: string;
  patientId: string;
  view: string;
  file: Blob;
  fileName: string;
  /** Fraction of the bytes sent, 0–1. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
}

/** The stored photo, and whether the server already had this very file for this view. */
export interface UploadResult {
  photo: PhotoDto;
  duplicate: boolean;
}

/**
 * Uploads one photo as multipart form data. XMLHttpRequest rather than fetch because only it reports upload
 * progress. A stale CSRF token is refetched once, like the JSON client does.
 */
export async function uploadPhoto(input: UploadInput): Promise<UploadResult> {
  const send = async (retry: boolean): Promise<UploadResult> => {
    const token = await getCsrfToken();
    const form = new FormData();
    form.append('view', input.view);
    form.append('patientId', input.patientId);
    form.append('photo', input.file, input.fileName);
    const res = await new Promise<{ status: number; body: unknown }>((resolve, reject) => {
      const xhr = new XMLHttpRequest();
      xhr.open('POST', `/api/visits/${input.visitId}/photos`);
      xhr.setRequestHeader('X-CSRF-Token', token);
      xhr.setRequestHeader('Accept', 'application/json');
      xhr.responseType = 'json';
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) input.onProgress?.(e.loaded / e.total);
      };
      xhr.onload = () => resolve({ status: xhr.status, body: xhr.response });
      xhr.onerror = () => reject(new ApiError(0, 'NETWORK', 'The connection to Twinframe was lost during the upload. Check the network and try again.'));
      xhr.onabort = () => reject(new ApiError(0, 'ABORTED', 'The upload was cancelled.'));
      input.signal?.addEventListener('abort', () => xhr.abort(), { once: true });
      xhr.send(form);
    });
    if (res.status === 200 || res.status === 201) {
      input.onProgress?.(1);
      return { photo: res.body as PhotoDto, duplicate: res.status === 200 };
    }
    const e = (res.body as { error?: { code: string; message: string; details?: unknown } } | null)?.error;
    const err = new ApiError(res.status, e?.code ?? `HTTP_${res.status}`, e?.message ?? `The server answered ${res.status}.`, e?.details);
    if (err.code === 'CSRF_INVALID' && retry) {
      resetCsrf();
      return send(false);
    }
    throw err;
  };
  return send(true);
}
