import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { Card } from '../../../components/ui/card';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { Notice } from '../../../components/ui/notice';
import { formatDate } from '../../../lib/format';
import { usePatientPhotos } from '../api/photos';
import { useShotLists } from '../api/shot-lists';
import { variantUrl, type PatientPhotoDto, type PhotoDto } from '../types';
import { PhotoViewer } from './photo-viewer';

/** All photos of a patient: a row per visit, a column per view, thumbnails opening at display size. */
export function PatientPhotos({ patientId }: { patientId: string }) {
  const [showReplaced, setShowReplaced] = useState(false);
  const { data: photos, isPending, error } = usePatientPhotos(patientId, showReplaced);
  const { data: lists } = useShotLists(true);
  const [viewing, setViewing] = useState<PhotoDto | null>(null);

  const labels = useMemo(() => {
    const m = new Map<string, string>();
    for (const l of lists ?? []) for (const v of l.views) if (!m.has(v.key)) m.set(v.key, v.label);
    return m;
  }, [lists]);
  // Columns: views in the order of the built-in list, then any other view that has a photo.
  const columns = useMemo(() => {
    const order = (lists ?? []).flatMap((l) => l.views.map((v) => v.key));
    const present = new Set((photos ?? []).map((p) => p.viewKey));
    return [...new Set(order)].filter((k) => present.has(k)).concat([...present].filter((k) => !order.includes(k)));
  }, [lists, photos]);
  const rows = useMemo(() => {
    const byVisit = new Map<string, { visitId: string; startsAt: string; cells: Map<string, PatientPhotoDto[]> }>();
    for (const p of photos ?? []) {
      const row = byVisit.get(p.visitId) ?? { visitId: p.visitId, startsAt: p.visitStartsAt ?? p.capturedAt, cells: new Map() };
      row.cells.set(p.viewKey, [...(row.cells.get(p.viewKey) ?? []), p]);
      byVisit.set(p.visitId, row);
    }
    return [...byVisit.values()].sort((a, b) => b.startsAt.localeCompare(a.startsAt));
  }, [photos]);

  if (isPending) return <Spinner label="Loading photos" />;
  if (error) return <Notice tone="danger">{error.message}</Notice>;
  const label = (k: string) => labels.get(k) ?? k;

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <p className="text-ink-muted">
          {photos.length} photo{photos.length === 1 ? '' : 's'} over {rows.length} visit{rows.length === 1 ? '' : 's'}
        </p>
        <label className="flex min-h-11 items-center gap-2 text-sm">
          <input type="checkbox" checked={showReplaced} onChange={(e) => setShowReplaced(e.target.checked)} className="size-5 accent-[var(--color-accent)]" />
          Show replaced photos
        </label>
      </div>
      {rows.length === 0 ? (
        <EmptyState title="No photos yet">Open a visit and use its Photos screen to capture the standard views.</EmptyState>
      ) : (
        <Card className="overflow-x-auto">
          <table className="w-full border-collapse text-sm">
            <thead>
              <tr className="border-b border-line text-left text-ink-muted">
                <th scope="col" className="sticky left-0 bg-paper-raised px-4 py-2 font-medium">
                  Visit
                </th>
                {columns.map((k) => (
                  <th key={k} scope="col" className="px-2 py-2 font-medium">
                    {label(k)}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {rows.map((row) => (
                <tr key={row.visitId} className="border-b border-line last:border-0">
                  <th scope="row" className="sticky left-0 bg-paper-raised px-4 py-2 text-left align-top font-medium">
                    <Link to={`/visits/${row.visitId}/photos`} className="inline-flex min-h-11 items-center hover:underline">
                      {formatDate(row.startsAt)}
                    </Link>
                  </th>
                  {columns.map((k) => (
                    <td key={k} className="px-2 py-2 align-top">
                      <div className="flex flex-col gap-1">
                        {(row.cells.get(k) ?? []).map((p) => {
                          const thumb = variantUrl(p, 'thumb');
                          return (
                            <button
                              key={p.id}
                              type="button"
                              onClick={() => setViewing(p)}
                              className={`block h-24 w-20 overflow-hidden rounded bg-photo-surround ${p.state === 'replaced' ? 'opacity-60 outline outline-1 outline-warn' : ''}`}
                              aria-label={`${label(k)}, ${formatDate(row.startsAt)}${p.state === 'replaced' ? ', replaced' : ''}`}
                            >
                              {thumb && <img src={thumb} alt="" loading="lazy" className="h-full w-full object-contain" />}
                            </button>
                          );
                        })}
                      </div>
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </Card>
      )}
      <PhotoViewer photo={viewing} viewLabel={viewing ? label(viewing.viewKey) : ''} onClose={() => setViewing(null)} />
    </div>
  );
}
