import { CheckCircle2, RotateCcw, X } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { ProgressBar } from './progress-bar';
import type { UploadItem } from './use-upload-queue';

const STATUS_TEXT: Record<UploadItem['status'], string> = {
  waiting: 'Waiting',
  uploading: 'Uploading',
  done: 'Stored',
  failed: 'Not stored',
};

/** The uploads of this visit: one row per file with its progress, and why it failed when it did. */
export function UploadList({ items, viewLabel, onRetry, onDismiss, onClear }: {
  items: UploadItem[];
  viewLabel: (key: string) => string;
  onRetry: (id: string) => void;
  onDismiss: (id: string) => void;
  onClear: () => void;
}) {
  if (!items.length) return null;
  const finished = items.filter((i) => i.status === 'done').length;
  return (
    <section aria-label="Uploads" className="rounded-xl border border-line bg-paper-raised">
      <div className="flex items-center justify-between border-b border-line px-4 py-2">
        <h2 className="font-semibold">
          Uploads <span className="font-normal text-ink-muted">· {finished} of {items.length} stored</span>
        </h2>
        {finished > 0 && (
          <Button size="sm" variant="ghost" onClick={onClear}>
            Clear stored
          </Button>
        )}
      </div>
      <ul>
        {items.map((item) => (
          <li key={item.id} data-upload-status={item.status} className="grid grid-cols-[1fr_auto] items-center gap-x-3 gap-y-1 border-b border-line px-4 py-2.5 last:border-0">
            <p className="min-w-0 truncate text-sm">
              <span className="font-medium">{viewLabel(item.view)}</span> <span className="text-ink-faint">· {item.fileName}</span>
            </p>
            <span className={item.status === 'failed' ? 'text-sm font-medium text-danger' : item.status === 'done' ? 'flex items-center gap-1 text-sm text-done' : 'text-sm text-ink-muted'}>
              {item.status === 'done' && <CheckCircle2 className="size-4" aria-hidden />}
              {item.status === 'done' && item.duplicate ? 'Already stored' : STATUS_TEXT[item.status]}
              {item.status === 'uploading' && ` ${Math.round(item.progress * 100)} %`}
            </span>
            <ProgressBar
              value={item.status === 'done' ? 1 : item.progress}
              label={`Upload of ${item.fileName} for ${viewLabel(item.view)}`}
              tone={item.status === 'done' ? 'done' : item.status === 'failed' ? 'danger' : 'accent'}
              className="col-span-2"
            />
            {item.status === 'failed' && (
              <div className="col-span-2 flex flex-wrap items-center justify-between gap-2">
                <p role="alert" className="text-sm text-danger">
                  {item.error}
                </p>
                <div className="flex gap-2">
                  {item.retryable && (
                    <Button size="sm" onClick={() => onRetry(item.id)}>
                      <RotateCcw className="size-4" /> Try again
                    </Button>
                  )}
                  <Button size="sm" variant="ghost" onClick={() => onDismiss(item.id)} aria-label={`Dismiss ${item.fileName}`}>
                    <X className="size-4" />
                  </Button>
                </div>
              </div>
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}
