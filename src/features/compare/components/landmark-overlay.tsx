import type { OverlayPoints } from '../types';

type XY = [number, number];
const OUTER_LIP = [48, 49, 50, 51, 52, 53, 54, 55, 56, 57, 58, 59];
const INNER_LIP = [60, 61, 62, 63, 64, 65, 66, 67];
const EYES = [
  [36, 37, 38, 39, 40, 41],
  [42, 43, 44, 45, 46, 47],
];

/**
 * The landmarks drawn over a photo in the photo's own pixel coordinates (the SVG's viewBox), so they stay on the
 * photo at any size. White points with a dark edge read on skin and on the grey surround alike.
 */
export function LandmarkOverlay({ data }: { data: OverlayPoints }) {
  const pts = data.points;
  const r = Math.max(data.width, data.height) / 260;
  const path = (idx: number[]) => {
    const ps = idx.map((i) => pts?.[i]).filter((p): p is XY => !!p);
    return ps.length === idx.length ? `M${ps.map((p) => `${p[0]},${p[1]}`).join('L')}Z` : null;
  };
  return (
    <svg viewBox={`0 0 ${data.width} ${data.height}`} className="pointer-events-none absolute inset-0 size-full" aria-hidden data-testid="landmark-overlay">
      <g fill="none" stroke="white" strokeWidth={r * 0.5} strokeOpacity={0.85}>
        {[OUTER_LIP, INNER_LIP, ...EYES].map((idx, i) => {
          const d = path(idx);
          return d ? <path key={i} d={d} /> : null;
        })}
      </g>
      <g fill="white" stroke="#1f1c19" strokeWidth={r * 0.35}>
        {pts?.map((p, i) => (p ? <circle key={i} cx={p[0]} cy={p[1]} r={r} /> : null))}
      </g>
      <g fill="none" stroke="white" strokeWidth={r * 0.6}>
        {data.anchors?.map((p, i) => <circle key={i} cx={p[0]} cy={p[1]} r={r * 2.4} />)}
      </g>
    </svg>
  );
}
