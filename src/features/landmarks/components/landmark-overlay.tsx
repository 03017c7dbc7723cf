import { Spinner } from '../../../components/ui/page';
import { usePhotoLandmarks } from '../api/landmarks';

/** The photo with its landmarks drawn over it, read-only (shown on request on the measurements screen). */
export function LandmarkOverlay({ photoId }: { photoId: string }) {
  const { data, isPending } = usePhotoLandmarks(photoId);
  if (isPending) return <Spinner label="Loading landmarks" />;
  if (!data?.image || !data.landmarks) return <p className="text-sm text-ink-muted">No landmarks on this photo.</p>;
  const { width: W, height: H } = data.image;
  const lm = data.landmarks;
  const u = Math.max(W, H) / 700;
  const lip = (from: number, to: number, close = true) => {
    const ps = Array.from({ length: to - from + 1 }, (_, i) => lm.points?.[from + i]).filter((p): p is [number, number] => !!p);
    return ps.length ? `M${ps.map((p) => p.join(' ')).join('L')}${close ? 'Z' : ''}` : '';
  };
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="max-h-[60vh] w-full rounded-lg bg-photo-surround" role="img" aria-label={`Landmarks on the ${data.view.label} photo`}>
      <image href={data.image.url ?? undefined} width={W} height={H} />
      {lm.points && (
        <>
          <path d={lip(48, 59)} fill="none" stroke="#ffffff" strokeWidth={1.5 * u} />
          <path d={lip(60, 67)} fill="none" stroke="#ffffff" strokeWidth={1 * u} strokeDasharray={`${4 * u} ${3 * u}`} />
        </>
      )}
      {lm.points?.map((p, i) => (p ? <circle key={i} cx={p[0]} cy={p[1]} r={2.5 * u} fill="#ffffff" stroke="#1f1c19" strokeWidth={0.8 * u} /> : null))}
      {(data.alignment?.anchors ?? lm.anchors ?? []).map((p, i) => (
        <circle key={`a${i}`} cx={p[0]} cy={p[1]} r={9 * u} fill="none" stroke="#2f6f6a" strokeWidth={2.5 * u} />
      ))}
      {lm.ruler && <line x1={lm.ruler.a[0]} y1={lm.ruler.a[1]} x2={lm.ruler.b[0]} y2={lm.ruler.b[1]} stroke="#f2b84b" strokeWidth={2 * u} />}
    </svg>
  );
}
