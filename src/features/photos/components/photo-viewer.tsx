import { Link } from 'react-router-dom';
import { Dialog } from '../../../components/ui/dialog';
import { Badge } from '../../../components/ui/badge';
import { formatDateTime } from '../../../lib/format';
import { variantUrl, type PhotoDto } from '../types';

/** One photo at display size with its record. Opening it is a logged view of the photo (the server logs it). */
export function PhotoViewer({ photo, viewLabel, onClose }: { photo: PhotoDto | null; viewLabel: string; onClose: () => void }) {
  const display = photo ? variantUrl(photo, 'display') : null;
  const master = photo ? variantUrl(photo, 'master') : null;
  return (
    <Dialog open={!!photo} onClose={onClose} title={viewLabel} className="w-[min(64rem,calc(100vw-1rem))]">
      {photo && (
        <div className="space-y-3">
          <div className="grid h-[min(58dvh,48rem)] place-items-center rounded-lg bg-photo-surround">
            {display && <img src={display} alt={`${viewLabel}, ${formatDateTime(photo.capturedAt)}`} className="max-h-full max-w-full object-contain" />}
          </div>
          <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
            <div className="flex gap-2">
              <dt className="text-ink-muted">Taken</dt>
              <dd>
                {formatDateTime(photo.capturedAt)}
                {photo.captureTimeSource === 'upload' && <span className="text-ink-faint"> (upload time; the file did not say)</span>}
              </dd>
            </div>
            <div className="flex gap-2">
              <dt className="text-ink-muted">Stored</dt>
              <dd>
                {formatDateTime(photo.uploadedAt)}
                {photo.uploadedByName ? ` by ${photo.uploadedByName}` : ''}
              </dd>
            </div>
            <div className="flex gap-2">
              <dt className="text-ink-muted">Size</dt>
              <dd>
                {photo.width} × {photo.height} px
              </dd>
            </div>
            <div className="flex min-w-0 gap-2">
              <dt className="text-ink-muted">SHA-256</dt>
              <dd className="truncate font-mono text-xs leading-5" title={photo.sha256}>
                {photo.sha256}
              </dd>
            </div>
          </dl>
          <div className="flex flex-wrap items-center justify-between gap-2">
            {photo.state === 'replaced' ? <Badge tone="warn">Replaced by a retake</Badge> : <Badge tone="done">Current photo of this view</Badge>}
            <div className="flex gap-3 text-sm">
              <Link to={`/photos/${photo.id}/landmarks`} className="inline-flex min-h-11 items-center font-medium text-accent-strong hover:underline">
                Landmarks
              </Link>
              {master && (
                <a href={master} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center font-medium text-accent-strong hover:underline">
                  Full resolution
                </a>
              )}
            </div>
          </div>
        </div>
      )}
    </Dialog>
  );
}
