import { useId } from 'react';
import { Camera, Smartphone } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { variantUrl, type PhotoDto, type ShotListViewDto } from '../types';
import { ProgressBar } from './progress-bar';
import type { UploadItem } from './use-upload-queue';

export type SlotState = 'empty' | 'captured' | 'uploading' | 'failed';

/** One view of the visit's shot list: its photo (or none), its state, how to position, and the ways to take it. */
export function ViewSlot({
  view,
  current,
  replaced,
  showReplaced,
  upload,
  cameraAvailable,
  onCamera,
  onFile,
  onOpen,
}: {
  view: ShotListViewDto;
  current: PhotoDto | undefined;
  replaced: PhotoDto[];
  showReplaced: boolean;
  upload: UploadItem | undefined;
  cameraAvailable: boolean;
  onCamera: () => void;
  onFile: (file: File) => void;
  onOpen: (photo: PhotoDto) => void;
}) {
  const inputId = useId();
  const state: SlotState = upload?.status === 'uploading' || upload?.status === 'waiting' ? 'uploading' : upload?.status === 'failed' ? 'failed' : current ? 'captured' : 'empty';
  const thumb = current ? variantUrl(current, 'thumb') : null;
  return (
    <article aria-label={view.label} data-view={view.key} data-state={state} className="flex flex-col rounded-xl border border-line bg-paper-raised">
      <header className="flex items-start justify-between gap-2 px-3 pt-3">
        <h3 className="font-semibold leading-tight">{view.label}</h3>
        {state === 'captured' && <Badge tone="done">Captured</Badge>}
        {state === 'empty' && <Badge>Empty</Badge>}
        {state === 'uploading' && <Badge tone="accent">Uploading</Badge>}
        {state === 'failed' && <Badge tone="danger">Not stored</Badge>}
      </header>
      <div className={cn('relative mx-3 mt-2 grid place-items-center overflow-hidden rounded-lg bg-photo-surround', view.anchorKind === 'lips' ? 'aspect-[8/5]' : 'aspect-[4/5]')}>
        {thumb ? (
          <button type="button" onClick={() => current && onOpen(current)} className="h-full w-full" aria-label={`Open the ${view.label} photo`}>
            <img src={thumb} alt={`${view.label}, taken ${formatDate(current!.capturedAt)}`} className="h-full w-full object-contain" />
          </button>
        ) : (
          <span className="px-3 text-center text-sm text-white/80">No photo yet</span>
        )}
        {state === 'uploading' && upload && (
          <div className="absolute inset-x-2 bottom-2 rounded bg-ink/70 p-2">
            <ProgressBar value={upload.progress} label={`Upload for ${view.label}`} />
          </div>
        )}
      </div>
      {state === 'failed' && upload?.error && (
        <p role="alert" className="mx-3 mt-2 text-sm text-danger">
          {upload.error}
        </p>
      )}
      {replaced.length > 0 && (
        <p className="mx-3 mt-2 text-xs text-ink-muted">
          {replaced.length} earlier photo{replaced.length > 1 ? 's' : ''} kept as replaced
        </p>
      )}
      {showReplaced && replaced.length > 0 && (
        <ul aria-label={`Replaced photos of ${view.label}`} className="mx-3 mt-1 flex flex-wrap gap-1.5">
          {replaced.map((p) => {
            const u = variantUrl(p, 'thumb');
            return (
              <li key={p.id}>
                <button type="button" onClick={() => onOpen(p)} className="block size-14 overflow-hidden rounded bg-photo-surround opacity-80 hover:opacity-100" aria-label={`Replaced photo from ${formatDate(p.uploadedAt)}`}>
                  {u && <img src={u} alt="" className="h-full w-full object-contain" />}
                </button>
              </li>
            );
          })}
        </ul>
      )}
      {view.hint && (
        <details className="mx-3 mt-2 text-sm text-ink-muted">
          <summary className="min-h-9 cursor-pointer py-1.5 font-medium text-ink">Positioning</summary>
          <p className="pb-1">{view.hint}</p>
        </details>
      )}
      <div className="mt-auto flex flex-wrap gap-2 p-3">
        {cameraAvailable && (
          <button type="button" onClick={onCamera} className="inline-flex min-h-11 flex-1 items-center justify-center gap-1.5 rounded-lg bg-accent px-3 text-sm font-medium text-white hover:bg-accent-strong">
            <Camera className="size-4" aria-hidden /> {current ? 'Retake' : 'Camera'}
          </button>
        )}
        <label htmlFor={inputId} className="inline-flex min-h-11 flex-1 cursor-pointer items-center justify-center gap-1.5 rounded-lg border border-line-strong px-3 text-sm font-medium hover:bg-paper-sunk">
          <Smartphone className="size-4" aria-hidden /> Device camera
        </label>
        <input
          id={inputId}
          type="file"
          accept="image/*"
          capture="environment"
          className="sr-only"
          aria-label={`Photo file for ${view.label}`}
          onChange={(e) => {
            const f = e.target.files?.[0];
            if (f) onFile(f);
            e.target.value = '';
          }}
        />
      </div>
    </article>
  );
}
