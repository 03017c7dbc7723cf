import { Link } from 'react-router-dom';
import { Camera } from 'lucide-react';
import { Card, CardHeader } from '../../../components/ui/card';
import { useVisitPhotos } from '../api/photos';
import { useShotList } from '../api/shot-lists';
import { variantUrl } from '../types';

/** The visit page's summary of its photos: which views are captured, and the way to the capture screen. */
export function VisitPhotosCard({ visitId, shotListId }: { visitId: string; shotListId: string }) {
  const { data: list } = useShotList(shotListId);
  const { data: photos } = useVisitPhotos(visitId);
  const byView = new Map((photos ?? []).map((p) => [p.viewKey, p]));
  const views = list?.views ?? [];
  const done = views.filter((v) => byView.has(v.key)).length;
  return (
    <Card>
      <CardHeader
        title="Photos"
        action={
          <Link to={`/visits/${visitId}/photos`} className="inline-flex min-h-11 items-center gap-2 rounded-lg bg-accent px-4 text-[15px] font-medium text-white hover:bg-accent-strong">
            <Camera className="size-4" aria-hidden /> Capture photos
          </Link>
        }
      />
      <div className="px-5 py-4">
        <p className="mb-3 text-sm text-ink-muted">
          {done} of {views.length} views captured{list ? ` · ${list.name}` : ''}
        </p>
        <ul className="flex flex-wrap gap-2">
          {views.map((v) => {
            const p = byView.get(v.key);
            const thumb = p ? variantUrl(p, 'thumb') : null;
            return (
              <li key={v.key} title={v.label} className="grid h-20 w-16 place-items-center overflow-hidden rounded bg-photo-surround text-center text-[10px] leading-tight text-white/80">
                {thumb ? <img src={thumb} alt={v.label} className="h-full w-full object-contain" /> : <span className="px-1">{v.label}</span>}
              </li>
            );
          })}
        </ul>
      </div>
    </Card>
  );
}
