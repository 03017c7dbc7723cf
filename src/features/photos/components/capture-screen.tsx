import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { Select } from '../../../components/ui/field';
import { formatDate } from '../../../lib/format';
import { usePatientPhotos, useVisitPhotos } from '../api/photos';
import { useSetVisitShotList, useShotList, useShotLists } from '../api/shot-lists';
import { variantUrl, type PhotoDto } from '../types';
import { BulkUpload } from './bulk-upload';
import { CameraDialog } from './camera-dialog';
import { PhotoViewer } from './photo-viewer';
import { UploadList } from './upload-list';
import { useUploadQueue } from './use-upload-queue';
import { ViewSlot } from './view-slot';

/** What the capture screen needs to know about its visit (the visits feature owns the full record). */
export interface CaptureVisit {
  id: string;
  patientId: string;
  startsAt: string;
  shotListId: string;
  cancelled: boolean;
}

const cameraAvailable = () => typeof navigator !== 'undefined' && !!navigator.mediaDevices?.getUserMedia;

/**
 * Capture for one visit: a slot per view of the visit's shot list, the in-page camera with the previous visit's
 * photo as a guide, the device's own camera as a fallback, and drop-to-upload for photos from a computer.
 */
export function CaptureScreen({ visit, onVisitChanged }: { visit: CaptureVisit; onVisitChanged: () => unknown }) {
  const { data: list, isPending: listPending, error: listError } = useShotList(visit.shotListId);
  const { data: lists } = useShotLists();
  const setList = useSetVisitShotList(visit.id, onVisitChanged);
  const { data: photos, isPending: photosPending } = useVisitPhotos(visit.id, true);
  const { data: patientPhotos } = usePatientPhotos(visit.patientId);
  const queue = useUploadQueue(visit.id, visit.patientId);
  const [showReplaced, setShowReplaced] = useState(false);
  const [cameraFor, setCameraFor] = useState<string | null>(null);
  const [viewing, setViewing] = useState<PhotoDto | null>(null);

  const views = useMemo(() => list?.views ?? [], [list]);
  const label = (key: string) => views.find((v) => v.key === key)?.label ?? key;
  const current = useMemo(() => new Map((photos ?? []).filter((p) => p.state === 'captured').map((p) => [p.viewKey, p])), [photos]);
  const replaced = useMemo(() => {
    const m = new Map<string, PhotoDto[]>();
    for (const p of photos ?? []) if (p.state === 'replaced') m.set(p.viewKey, [...(m.get(p.viewKey) ?? []), p]);
    return m;
  }, [photos]);
  // The latest upload of each view decides the slot's progress and error.
  const uploads = useMemo(() => new Map(queue.items.map((i) => [i.view, i])), [queue.items]);
  const previous = (viewKey: string) =>
    (patientPhotos ?? [])
      .filter((p) => p.viewKey === viewKey && p.visitId !== visit.id && (p.visitStartsAt ?? '') < visit.startsAt)
      .sort((a, b) => (b.visitStartsAt ?? '').localeCompare(a.visitStartsAt ?? ''))[0];

  if (listPending || photosPending) return <Spinner label="Loading the shot list" />;
  if (listError || !list) return <Notice tone="danger">{listError?.message ?? 'The shot list of this visit could not be loaded.'}</Notice>;
  if (visit.cancelled) return <EmptyState title="This visit was cancelled">Photos cannot be added to a cancelled visit.</EmptyState>;

  const replacedCount = [...replaced.values()].reduce((n, xs) => n + xs.length, 0);
  const cameraView = views.find((v) => v.key === cameraFor);
  const guide = cameraFor ? previous(cameraFor) : undefined;
  const canCamera = cameraAvailable();

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 className="text-2xl font-semibold">Photos</h2>
          <p className="text-ink-muted">
            {current.size} of {views.length} views captured · shot list “{list.name}”
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-3">
          {(lists?.length ?? 0) > 1 && (
            <label className="flex items-center gap-2 text-sm text-ink-muted">
              Shot list
              <Select value={visit.shotListId} onChange={(e) => setList.mutate(e.target.value)} disabled={setList.isPending} className="w-56">
                {lists!.map((l) => (
                  <option key={l.id} value={l.id}>
                    {l.name}
                  </option>
                ))}
              </Select>
            </label>
          )}
          {replacedCount > 0 && (
            <label className="flex min-h-11 items-center gap-2 text-sm">
              <input type="checkbox" checked={showReplaced} onChange={(e) => setShowReplaced(e.target.checked)} className="size-5 accent-[var(--color-accent)]" />
              Show replaced photos ({replacedCount})
            </label>
          )}
        </div>
      </div>
      {setList.error && <Notice tone="danger">{setList.error.message}</Notice>}

      <BulkUpload views={views} filledKeys={new Set(current.keys())} onUpload={(files) => queue.add(files.map((f) => ({ file: f.file, fileName: f.file.name, view: f.view })))} />
      <UploadList items={queue.items} viewLabel={label} onRetry={queue.retry} onDismiss={queue.dismiss} onClear={queue.clearFinished} />

      <div className="grid grid-cols-2 gap-3 md:grid-cols-3 lg:grid-cols-4">
        {views.map((v) => (
          <ViewSlot
            key={v.key}
            view={v}
            current={current.get(v.key)}
            replaced={replaced.get(v.key) ?? []}
            showReplaced={showReplaced}
            upload={uploads.get(v.key)}
            cameraAvailable={canCamera}
            onCamera={() => setCameraFor(v.key)}
            onFile={(file) => queue.add([{ file, fileName: file.name, view: v.key }])}
            onOpen={setViewing}
          />
        ))}
      </div>

      <p className="text-sm text-ink-muted">
        Every stored photo is turned upright and loses its location, camera and owner data before it is kept. A retake keeps the earlier photo as
        “replaced”. See all photos of this patient on the <Link to={`/patients/${visit.patientId}/photos`} className="font-medium text-accent-strong hover:underline">Photos tab</Link>.
      </p>

      {cameraView && (
        <CameraDialog
          open
          onClose={() => setCameraFor(null)}
          viewLabel={cameraView.label}
          hint={cameraView.hint}
          overlayUrl={guide ? variantUrl(guide, 'display') : null}
          overlayDate={guide?.visitStartsAt ? formatDate(guide.visitStartsAt) : undefined}
          onCapture={(blob) => queue.add([{ file: blob, fileName: `camera-${cameraView.key}.jpg`, view: cameraView.key }])}
        />
      )}
      <PhotoViewer photo={viewing} viewLabel={viewing ? label(viewing.viewKey) : ''} onClose={() => setViewing(null)} />
    </div>
  );
}
