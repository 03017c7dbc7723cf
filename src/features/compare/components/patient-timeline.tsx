import { Link } from 'react-router-dom';
import { ImageOff, Loader2, Columns2, Syringe } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { buttonVariants } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { thumbSource, useTimeline } from '../api/compare';
import { SHORT_VIEW_LABEL, type Timeline, type TimelineVisit } from '../types';

const KIND_LABEL: Record<TimelineVisit['kind'], string> = { consultation: 'Consultation', treatment: 'Treatment', review: 'Review', 'follow-up': 'Follow-up' };

/** "0.55 mL filler · 6 U toxin" from a visit's treatment totals. */
export function treatmentSummary(t: NonNullable<TimelineVisit['treatment']>): string {
  const parts = [];
  if (t.fillerMl > 0) parts.push(`${+t.fillerMl.toFixed(2)} mL filler`);
  if (t.toxinU > 0) parts.push(`${+t.toxinU.toFixed(1)} U toxin`);
  return parts.join(' · ') || 'Treatment recorded';
}

/**
 * The patient's visits in time order, each with a row of thumbnails, one column per view. A view not taken at a visit
 * stays visible as an empty slot, so a missing photo is noticed before a comparison is planned around it.
 */
export function PatientTimeline({ patientId, compareHref }: { patientId: string; compareHref: (q: { view?: string; b?: string }) => string }) {
  const { data, isPending, error } = useTimeline(patientId);
  if (isPending) return <Spinner label="Loading the timeline" />;
  if (error) return <Notice tone="danger">{error.message}</Notice>;
  if (!data.visits.length) return <EmptyState title="No visits yet">Photos appear here, visit by visit, once they are taken.</EmptyState>;
  const withPhotos = data.visits.filter((v) => Object.keys(v.photos).length > 0).length;
  return (
    <section aria-labelledby="timeline-title" className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id="timeline-title" className="text-2xl font-semibold">
            Timeline
          </h2>
          <p className="text-ink-muted">
            {data.visits.length} {data.visits.length === 1 ? 'visit' : 'visits'}, {withPhotos} with photos. Tap a photo to compare that view.
          </p>
        </div>
        {withPhotos > 0 && (
          <Link to={compareHref({})} className={buttonVariants({ variant: 'primary' })}>
            <Columns2 className="size-4" aria-hidden /> Compare
          </Link>
        )}
      </div>
      <Card className="overflow-x-auto">
        <table className="w-full border-collapse text-left">
          <caption className="sr-only">Visits in time order with a photo per view; an empty slot means the view was not taken.</caption>
          <thead>
            <tr className="border-b border-line text-xs font-medium text-ink-muted">
              <th scope="col" className="w-44 px-4 py-2 font-medium">
                Visit
              </th>
              {data.views.map((v) => (
                <th key={v.key} scope="col" className="px-1 py-2 text-center font-medium" title={v.label}>
                  <span className="block leading-tight">{SHORT_VIEW_LABEL[v.key] ?? v.label}</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {data.visits.map((v) => (
              <VisitRow key={v.id} visit={v} views={data.views} compareHref={compareHref} />
            ))}
          </tbody>
        </table>
      </Card>
    </section>
  );
}

function VisitRow({ visit, views, compareHref }: { visit: TimelineVisit; views: Timeline['views']; compareHref: (q: { view?: string; b?: string }) => string }) {
  return (
    <tr className="border-b border-line align-top last:border-0">
      <th scope="row" className="px-4 py-3 text-left font-normal">
        <p className="font-semibold">{formatDate(visit.startsAt)}</p>
        <p className="mt-1 flex flex-wrap items-center gap-1.5">
          <Badge>{KIND_LABEL[visit.kind]}</Badge>
        </p>
        {visit.practitionerName && <p className="mt-1 text-sm text-ink-muted">{visit.practitionerName}</p>}
        {visit.treatment && (
          <p className="mt-1 flex items-start gap-1 text-sm text-ink-muted">
            <Syringe className="mt-0.5 size-3.5 shrink-0" aria-hidden />
            <span>
              {treatmentSummary(visit.treatment)}
              {visit.treatment.products.length > 0 && <span className="block text-xs text-ink-faint">{visit.treatment.products.join(', ')}</span>}
            </span>
          </p>
        )}
      </th>
      {views.map((view) => {
        const photo = visit.photos[view.key];
        const thumb = photo ? thumbSource(photo) : null;
        return (
          <td key={view.key} className="px-1 py-3">
            {photo && thumb ? (
              <Link
                to={compareHref({ view: view.key, b: visit.id })}
                className="group relative mx-auto block aspect-[4/5] w-16 overflow-hidden rounded-md bg-photo-surround lg:w-[4.5rem]"
                aria-label={`${view.label}, ${formatDate(visit.startsAt)}: compare`}
              >
                <img src={thumb} alt="" loading="lazy" decoding="async" className="size-full object-cover transition-opacity group-hover:opacity-85" />
                {photo.alignmentState === 'aligning' && (
                  <span className="absolute inset-x-0 bottom-0 flex justify-center bg-ink/60 py-0.5" title="Aligning">
                    <Loader2 className="size-3 animate-spin text-white" aria-label="Aligning" />
                  </span>
                )}
                {photo.alignmentState === 'needs-landmarks' && (
                  <span className="absolute inset-x-0 bottom-0 bg-warn/90 py-0.5 text-center text-[10px] font-medium text-white">Not aligned</span>
                )}
              </Link>
            ) : (
              <div
                className={cn('mx-auto grid aspect-[4/5] w-16 place-items-center rounded-md border border-dashed border-line-strong text-ink-faint lg:w-[4.5rem]')}
                title={`${view.label}: not taken at this visit`}
              >
                <ImageOff className="size-4" aria-hidden />
                <span className="sr-only">{view.label}: not taken</span>
              </div>
            )}
          </td>
        );
      })}
    </tr>
  );
}
