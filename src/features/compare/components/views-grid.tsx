import { memo } from 'react';
import { ImageOff } from 'lucide-react';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { thumbSource } from '../api/compare';
import type { Timeline, TimelineVisit } from '../types';

/**
 * Every view for the two chosen visits, as small photos (as taken): a quick check that the whole shot list was
 * covered, and a way to switch views while keeping the two visits.
 */
export const ViewsGrid = memo(function ViewsGrid({
  views,
  baseline,
  followUp,
  current,
  onView,
}: {
  views: Timeline['views'];
  baseline: TimelineVisit | null;
  followUp: TimelineVisit | null;
  current: string | null;
  onView: (key: string) => void;
}) {
  const cell = (v: TimelineVisit | null, key: string, label: string) => {
    const photo = v?.photos[key];
    const thumb = photo ? thumbSource(photo) : null;
    return thumb ? (
      <img src={thumb} alt="" loading="lazy" decoding="async" className="aspect-[4/5] w-full rounded-md bg-photo-surround object-cover" />
    ) : (
      <div className="grid aspect-[4/5] w-full place-items-center rounded-md border border-dashed border-line-strong text-ink-faint" title={`${label}: not taken`}>
        <ImageOff className="size-4" aria-hidden />
        <span className="sr-only">not taken</span>
      </div>
    );
  };
  return (
    <section aria-labelledby="views-grid-title">
      <h3 id="views-grid-title" className="text-lg font-semibold">
        All views for these two visits
      </h3>
      <p className="mb-3 text-sm text-ink-muted">
        {baseline ? formatDate(baseline.startsAt) : '—'} and {followUp ? formatDate(followUp.startsAt) : '—'}, as taken. Choose a view to compare it.
      </p>
      <ul className="grid grid-cols-4 gap-3 lg:grid-cols-8">
        {views.map((v) => (
          <li key={v.key}>
            <button
              type="button"
              onClick={() => onView(v.key)}
              aria-pressed={v.key === current}
              aria-label={`Compare ${v.label}`}
              className={cn('w-full rounded-lg p-1.5 text-left hover:bg-paper-sunk', v.key === current && 'bg-paper-sunk ring-2 ring-ink')}
            >
              <span className="grid grid-cols-2 gap-1">
                {cell(baseline, v.key, v.label)}
                {cell(followUp, v.key, v.label)}
              </span>
              <span className="mt-1 block text-xs font-medium leading-tight">{v.label}</span>
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
});
