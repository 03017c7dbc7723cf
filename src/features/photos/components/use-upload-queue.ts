import { useCallback, useEffect, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { ApiError } from '../../../lib/api-client';
import { photoKeys, uploadPhoto } from '../api/photos';
import { MAX_UPLOAD_BYTES, type PhotoDto } from '../types';

export type UploadStatus = 'waiting' | 'uploading' | 'done' | 'failed';

export interface UploadItem {
  id: string;
  file: Blob;
  fileName: string;
  view: string;
  status: UploadStatus;
  /** 0–1 while uploading. */
  progress: number;
  error?: string;
  /** False when the server refused the file itself: sending it again would fail the same way. */
  retryable?: boolean;
  photo?: PhotoDto;
  duplicate?: boolean;
}

let counter = 0;
const nextId = () => `u${Date.now().toString(36)}-${(counter += 1)}`;

/**
 * The visit's uploads, sent one at a time in the order queued (a tablet on clinic Wi-Fi does better with one
 * transfer than several competing ones). Failed items keep their reason and can be retried.
 */
export function useUploadQueue(visitId: string, patientId: string) {
  const qc = useQueryClient();
  const [items, setItems] = useState<UploadItem[]>([]);
  const busy = useRef(false);

  const patch = useCallback((id: string, p: Partial<UploadItem>) => setItems((xs) => xs.map((x) => (x.id === id ? { ...x, ...p } : x))), []);

  useEffect(() => {
    if (busy.current) return;
    const item = items.find((x) => x.status === 'waiting');
    if (!item) return;
    busy.current = true;
    patch(item.id, { status: 'uploading', progress: 0, error: undefined });
    const run = async () => {
      try {
        if (item.file.size > MAX_UPLOAD_BYTES) {
          throw new ApiError(413, 'FILE_TOO_LARGE', `The file is ${(item.file.size / 1024 / 1024).toFixed(0)} MB; the limit is 40 MB. Export the photo at a smaller size.`);
        }
        const result = await uploadPhoto({ visitId, patientId, view: item.view, file: item.file, fileName: item.fileName, onProgress: (f) => patch(item.id, { progress: f }) });
        patch(item.id, { status: 'done', progress: 1, photo: result.photo, duplicate: result.duplicate });
        await qc.invalidateQueries({ queryKey: photoKeys.lists() });
      } catch (err) {
        const status = err instanceof ApiError ? err.status : 0;
        const retryable = status === 0 || status >= 500 || status === 408 || status === 429;
        patch(item.id, { status: 'failed', error: err instanceof Error ? err.message : 'The upload failed.', retryable });
      } finally {
        busy.current = false;
        // Wake the effect for the next waiting item.
        setItems((xs) => [...xs]);
      }
    };
    void run();
  }, [items, patch, qc, visitId, patientId]);

  const add = useCallback((files: { file: Blob; fileName: string; view: string }[]) => {
    const added = files.map((f) => ({ ...f, id: nextId(), status: 'waiting' as const, progress: 0 }));
    setItems((xs) => [...xs, ...added]);
    return added.map((a) => a.id);
  }, []);
  const retry = useCallback((id: string) => patch(id, { status: 'waiting', progress: 0, error: undefined }), [patch]);
  const dismiss = useCallback((id: string) => setItems((xs) => xs.filter((x) => x.id !== id || x.status === 'uploading')), []);
  const clearFinished = useCallback(() => setItems((xs) => xs.filter((x) => x.status !== 'done')), []);

  return { items, add, retry, dismiss, clearFinished };
}
