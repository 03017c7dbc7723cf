import { useMutation } from '@tanstack/react-query';
import { api, ApiError } from '../../../lib/api-client';
import type { ErasePatientInput } from '../../../../server/features/patient-data/patient-data.schemas';

/**
 * Downloads the patient's ZIP while reporting progress against the server's size estimate,
 * then hands the file to the browser.
 */
export async function downloadPatientExport(patientId: string, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<void> {
  const res = await fetch(`/api/patients/${patientId}/export`, { credentials: 'same-origin', signal });
  if (!res.ok || !res.body) {
    const body = (await res.json().catch(() => null)) as { error?: { code: string; message: string } } | null;
    throw new ApiError(res.status, body?.error?.code ?? 'EXPORT_FAILED', body?.error?.message ?? 'The export could not be prepared.');
  }
  const estimate = Number(res.headers.get('X-Estimated-Bytes')) || 0;
  const reader = res.body.getReader();
  const parts: BlobPart[] = [];
  let received = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    parts.push(value);
    received += value.byteLength;
    if (estimate) onProgress(Math.min(0.99, received / estimate));
  }
  onProgress(1);
  const name = /filename="([^"]+)"/.exec(res.headers.get('Content-Disposition') ?? '')?.[1] ?? 'patient-records.zip';
  const url = URL.createObjectURL(new Blob(parts, { type: 'application/zip' }));
  const a = Object.assign(document.createElement('a'), { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export const erasePatient = (patientId: string, input: ErasePatientInput) =>
  api<{ erased: true; rows: number; files: number }>(`/api/patients/${patientId}`, { method: 'DELETE', body: input });

export const useErasePatient = (patientId: string) => useMutation({ mutationFn: (input: ErasePatientInput) => erasePatient(patientId, input) });
