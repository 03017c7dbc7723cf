import { useEffect, useId, useMemo, useRef, useState, type DragEvent } from 'react';
import { ImagePlus, Upload, X } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Select } from '../../../components/ui/field';
import { cn } from '../../../lib/cn';
import type { ShotListViewDto } from '../types';

interface Assigned {
  key: string;
  file: File;
  preview: string;
  view: string;
}

const byName = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/**
 * Default assignment: files in name order (cameras number their files in the order taken) go to the views in
 * shot-list order, empty views first, then views that already have a photo (those become retakes). Extra files
 * stay unassigned until a view is chosen.
 */
export function assignInOrder(files: File[], views: ShotListViewDto[], filledKeys: Set<string>): { file: File; view: string }[] {
  const sorted = [...files].sort((a, b) => byName.compare(a.name, b.name));
  const order = [...views.filter((v) => !filledKeys.has(v.key)), ...views.filter((v) => filledKeys.has(v.key))].map((v) => v.key);
  return sorted.map((file, i) => ({ file, view: order[i] ?? '' }));
}

/** Drop many photos onto the visit (or choose them), check which view each is, then upload them all. */
export function BulkUpload({ views, filledKeys, onUpload }: { views: ShotListViewDto[]; filledKeys: Set<string>; onUpload: (files: { file: File; view: string }[]) => void }) {
  const inputId = useId();
  const [over, setOver] = useState(false);
  const [assigned, setAssigned] = useState<Assigned[]>([]);
  const [skipped, setSkipped] = useState<string[]>([]);

  // Preview URLs live until their row goes or the screen closes.
  const previews = useRef(new Set<string>());
  useEffect(() => {
    const urls = previews.current;
    return () => urls.forEach((u) => URL.revokeObjectURL(u));
  }, []);
  const release = (rows: Assigned[]) =>
    rows.forEach((a) => {
      URL.revokeObjectURL(a.preview);
      previews.current.delete(a.preview);
    });

  const take = (list: FileList | null) => {
    if (!list?.length) return;
    const files = [...list];
    const images = files.filter((f) => f.type.startsWith('image/') || /\.(jpe?g|png|webp|tiff?|heic|heif|avif)$/i.test(f.name));
    setSkipped(files.filter((f) => !images.includes(f)).map((f) => f.name));
    const startKeys = new Set([...filledKeys, ...assigned.map((a) => a.view).filter(Boolean)]);
    const next = assignInOrder(images, views, startKeys).map(({ file, view }, i) => {
      const preview = URL.createObjectURL(file);
      previews.current.add(preview);
      return { key: `${Date.now()}-${i}-${file.name}`, file, view, preview };
    });
    setAssigned((xs) => [...xs, ...next]);
  };

  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    take(e.dataTransfer.files);
  };

  const clash = useMemo(() => {
    const counts = new Map<string, number>();
    for (const a of assigned) if (a.view) counts.set(a.view, (counts.get(a.view) ?? 0) + 1);
    return new Set([...counts].filter(([, n]) => n > 1).map(([k]) => k));
  }, [assigned]);
  const unassigned = assigned.filter((a) => !a.view).length;
  const ready = assigned.length > 0 && unassigned === 0 && clash.size === 0;

  const upload = () => {
    onUpload(assigned.map((a) => ({ file: a.file, view: a.view })));
    release(assigned);
    setAssigned([]);
    setSkipped([]);
  };

  return (
    <section aria-label="Upload from this device" className="space-y-3">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setOver(true);
        }}
        onDragLeave={() => setOver(false)}
        onDrop={onDrop}
        className={cn('flex flex-wrap items-center justify-between gap-3 rounded-xl border-2 border-dashed border-line-strong bg-paper-raised px-5 py-4', over && 'border-accent bg-accent-soft/40')}
      >
        <div className="flex items-center gap-3">
          <ImagePlus className="size-6 text-ink-muted" aria-hidden />
          <div>
            <p className="font-medium">Drop photos of this visit here</p>
            <p className="text-sm text-ink-muted">They are matched to the views in shot-list order; check each before uploading.</p>
          </div>
        </div>
        <label htmlFor={inputId} className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-4 font-medium hover:bg-paper-sunk">
          <Upload className="size-4" aria-hidden /> Choose photos
        </label>
        <input
          id={inputId}
          type="file"
          accept="image/*"
          multiple
          className="sr-only"
          data-testid="bulk-input"
          onChange={(e) => {
            take(e.target.files);
            e.target.value = '';
          }}
        />
      </div>
      {skipped.length > 0 && <p className="text-sm text-warn">Not photos, left out: {skipped.join(', ')}</p>}
      {assigned.length > 0 && (
        <div className="rounded-xl border border-line bg-paper-raised">
          <ul aria-label="Photos to upload">
            {assigned.map((a) => (
              <li key={a.key} className="flex items-center gap-3 border-b border-line px-4 py-2 last:border-0">
                <img src={a.preview} alt="" className="size-14 shrink-0 rounded bg-photo-surround object-contain" />
                <span className="min-w-0 flex-1 truncate text-sm">{a.file.name}</span>
                <Select
                  aria-label={`View of ${a.file.name}`}
                  value={a.view}
                  aria-invalid={!a.view || clash.has(a.view)}
                  onChange={(e) => setAssigned((xs) => xs.map((x) => (x.key === a.key ? { ...x, view: e.target.value } : x)))}
                  className="w-56"
                >
                  <option value="">Choose the view…</option>
                  {views.map((v) => (
                    <option key={v.key} value={v.key}>
                      {v.label}
                      {filledKeys.has(v.key) ? ' (retake)' : ''}
                    </option>
                  ))}
                </Select>
                <Button size="icon" variant="ghost" aria-label={`Leave out ${a.file.name}`} onClick={() => {
                    release([a]);
                    setAssigned((xs) => xs.filter((x) => x.key !== a.key));
                  }}>
                  <X className="size-4" />
                </Button>
              </li>
            ))}
          </ul>
          <div className="flex flex-wrap items-center justify-between gap-3 border-t border-line px-4 py-3">
            <p className="text-sm text-ink-muted">
              {clash.size > 0 ? 'Two photos are set to the same view: choose another for one of them.' : unassigned > 0 ? `Choose the view of ${unassigned} photo${unassigned > 1 ? 's' : ''}.` : 'Each photo goes to the view shown.'}
            </p>
            <div className="flex gap-2">
              <Button
                variant="ghost"
                onClick={() => {
                  release(assigned);
                  setAssigned([]);
                }}
              >
                Cancel
              </Button>
              <Button variant="primary" disabled={!ready} onClick={upload}>
                Upload {assigned.length} photo{assigned.length > 1 ? 's' : ''}
              </Button>
            </div>
          </div>
        </div>
      )}
    </section>
  );
}
