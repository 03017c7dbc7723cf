import { lazy, Suspense, useCallback, useRef, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { ArrowLeft, FileDown, Megaphone, Presentation } from 'lucide-react';
import { Button, buttonVariants } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useSeen } from '../../../lib/use-seen';
import { useMeasurements, usePair, useStartReview, useTimeline } from '../api/compare';
import { MODE_LABEL, type CompareMode, type PairComparison, type TimelinePhoto } from '../types';
import { CompareViewer } from './compare-viewer';
import { LandmarkOverlay } from './landmark-overlay';
import { MeasurementPanel } from './measurement-panel';
import { PairNotes } from './pair-notes';
import { SheetDialog } from './sheet-dialog';
import { useCompareState, type CompareParams } from './use-compare-state';
import { ViewsGrid } from './views-grid';

// The chart library is the heaviest part of the screen and sits below the pair: loaded when scrolled towards.
const TrendsChart = lazy(() => import('./trends-chart'));

export interface ComparePatient {
  id: string;
  firstName: string;
  lastName: string;
  code: string;
  email: string | null;
}

const KIND_LABEL = { consultation: 'Consultation', treatment: 'Treatment', review: 'Review', 'follow-up': 'Follow-up' } as const;

/** A segmented control: one choice of a few, each a 44 px target. */
export function Segmented<T extends string>({ label, value, options, onChange, tone = 'light' }: { label: string; value: T; options: { value: T; label: string }[]; onChange: (v: T) => void; tone?: 'light' | 'dark' }) {
  return (
    <div role="radiogroup" aria-label={label} className={cn('inline-flex rounded-lg p-1', tone === 'dark' ? 'bg-black/40' : 'bg-paper-sunk')}>
      {options.map((o) => (
        <button
          key={o.value}
          type="button"
          role="radio"
          aria-checked={o.value === value}
          onClick={() => onChange(o.value)}
          className={cn(
            'min-h-11 rounded-md px-3 text-sm font-medium',
            tone === 'dark' ? 'text-white/85 hover:text-white' : 'text-ink-muted hover:text-ink',
            o.value === value && (tone === 'dark' ? 'bg-white text-ink hover:text-ink' : 'bg-paper-raised text-ink shadow-sm'),
          )}
        >
          {o.label}
        </button>
      ))}
    </div>
  );
}

export function Toggle({ pressed, onChange, children, tone = 'light' }: { pressed: boolean; onChange: (v: boolean) => void; children: React.ReactNode; tone?: 'light' | 'dark' }) {
  return (
    <button
      type="button"
      aria-pressed={pressed}
      onClick={() => onChange(!pressed)}
      className={cn(
        'inline-flex min-h-11 items-center gap-2 rounded-lg border px-3 text-sm font-medium',
        tone === 'dark' ? 'border-white/30 text-white' : 'border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk',
        pressed && (tone === 'dark' ? 'bg-white text-ink' : 'border-ink bg-ink text-paper hover:bg-ink'),
      )}
    >
      <span aria-hidden className={cn('size-2.5 rounded-full border', pressed ? 'border-current bg-current' : 'border-current')} />
      {children}
    </button>
  );
}

/** The landmarks of a photo, in the coordinates of the image actually shown (aligned or as taken). */
export function overlayFor(pair: PairComparison | undefined, photo: TimelinePhoto, aligned: boolean) {
  const side = pair?.baseline.photoId === photo.id ? pair.baseline : pair?.followUp.photoId === photo.id ? pair.followUp : null;
  const data = side ? (aligned && photo.alignmentState === 'aligned' ? side.overlay.aligned : side.overlay.display) : null;
  return data ? <LandmarkOverlay data={data} /> : null;
}

/**
 * Compare (DESIGN §3): one view at a time, a baseline and a follow-up visit (defaults: the first and the latest with
 * that view), aligned photos unless the originals are asked for, in three modes; the measurements, the trend, the
 * warnings of the pair and a grid of every view for the two visits. All choices live in the URL, so the back button
 * and a reload keep them, and switching views keeps the chosen visits.
 */
export function CompareScreen({ patient, backTo }: { patient: ComparePatient; backTo: string }) {
  const [search, setSearch] = useSearchParams();
  const params: CompareParams = {
    view: search.get('view'),
    a: search.get('a'),
    b: search.get('b'),
    mode: search.get('mode') as CompareMode | null,
    src: search.get('src') as 'original' | null,
    lm: search.get('lm') as '1' | null,
  };
  // Two changes in a row (a visit, then a view) must both land: each builds on the latest, not on the last render.
  const latest = useRef(search);
  latest.current = search;
  const set = useCallback(
    (patch: Partial<CompareParams>) => {
      const next = new URLSearchParams(latest.current);
      for (const [k, v] of Object.entries(patch)) {
        if (v === null || v === undefined || v === '') next.delete(k);
        else next.set(k, v);
      }
      latest.current = next;
      setSearch(next, { replace: true });
    },
    [setSearch],
  );
  const onView = useCallback((key: string) => set({ view: key }), [set]);
  const timeline = useTimeline(patient.id);
  const s = useCompareState(timeline.data, params, set);
  const pair = usePair(patient.id, s.baseline.photo?.id ?? null, s.followUp.photo?.id ?? null);
  const measurements = useMeasurements(patient.id);
  const startReview = useStartReview(patient.id);
  const navigate = useNavigate();
  const [sheetOpen, setSheetOpen] = useState(false);
  const [trendsRef, trendsSeen] = useSeen<HTMLDivElement>();

  if (timeline.isPending) return <Spinner label="Loading photos" />;
  if (timeline.error) return <Notice tone="danger">{timeline.error.message}</Notice>;
  const name = `${patient.firstName} ${patient.lastName}`;
  const header = (
    <div className="flex flex-wrap items-center justify-between gap-3">
      <div className="flex min-w-0 items-center gap-2">
        <Link to={backTo} className="grid size-11 shrink-0 place-items-center rounded-lg text-ink-muted hover:bg-paper-sunk hover:text-ink" aria-label={`Back to ${name}`}>
          <ArrowLeft className="size-5" aria-hidden />
        </Link>
        <div className="min-w-0">
          <h1 className="truncate text-2xl font-semibold">Compare · {name}</h1>
          <p className="font-mono text-xs text-ink-faint">{patient.code}</p>
        </div>
      </div>
    </div>
  );
  if (!s.view) {
    return (
      <div className="space-y-4">
        {header}
        <EmptyState title="No photos to compare yet">Photos taken at visits appear here; a comparison needs the same view at two visits.</EmptyState>
      </div>
    );
  }
  const view = s.view;
  const visitOption = (v: (typeof s.withView)[number] | undefined, id: string) => {
    const visit = v ?? timeline.data.visits.find((x) => x.id === id)!;
    const has = !!visit.photos[view.key];
    return (
      <option key={visit.id} value={visit.id} disabled={!has}>
        {formatDate(visit.startsAt)} · {KIND_LABEL[visit.kind]}
        {has ? '' : ' (not taken)'}
      </option>
    );
  };
  const pairIds: [string, string] | null = s.baseline.photo && s.followUp.photo && s.baseline.photo.id !== s.followUp.photo.id ? [s.baseline.photo.id, s.followUp.photo.id] : null;

  const enterReview = async () => {
    // Full screen needs the tap itself; the server keeps review mode in the session either way.
    void document.documentElement.requestFullscreen?.().catch(() => undefined);
    await startReview.mutateAsync({
      view: view.key,
      baselinePhotoId: s.baseline.photo?.id,
      followUpPhotoId: s.followUp.photo?.id,
      mode: s.mode,
      aligned: s.aligned,
    });
    navigate('/review');
  };

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        {header}
        <div className="flex flex-wrap gap-2">
          <Button onClick={() => setSheetOpen(true)}>
            <FileDown className="size-4" aria-hidden /> Comparison sheet
          </Button>
          {pairIds && (
            // Marketing use is decided on the Showcase tab, against the patient's showcase consent.
            <Link className={buttonVariants()} to={`/patients/${patient.id}/showcase?view=${encodeURIComponent(view.key)}&photos=${pairIds.join(',')}`}>
              <Megaphone className="size-4" aria-hidden /> Showcase…
            </Link>
          )}
          <Button variant="primary" onClick={enterReview} busy={startReview.isPending} disabled={!s.baseline.photo}>
            <Presentation className="size-4" aria-hidden /> Review mode
          </Button>
        </div>
      </div>
      {startReview.error && <Notice tone="danger">{startReview.error.message}</Notice>}

      <div className="flex flex-wrap items-end gap-x-3 gap-y-2">
        <Field label="View" className="min-w-40 flex-1">
          {(p) => (
            <Select {...p} value={view.key} onChange={(e) => set({ view: e.target.value })}>
              {s.views.map((v) => (
                <option key={v.key} value={v.key}>
                  {v.label}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Baseline" className="min-w-44 flex-1">
          {(p) => (
            <Select {...p} value={s.baseline.visit?.id ?? ''} onChange={(e) => set({ a: e.target.value })}>
              {!s.baseline.visit && <option value="">Choose a visit</option>}
              {timeline.data.visits.map((v) => visitOption(v, v.id))}
            </Select>
          )}
        </Field>
        <Field label="Follow-up" className="min-w-44 flex-1">
          {(p) => (
            <Select {...p} value={s.followUp.visit?.id ?? ''} onChange={(e) => set({ b: e.target.value })}>
              {!s.followUp.visit && <option value="">Choose a visit</option>}
              {timeline.data.visits.map((v) => visitOption(v, v.id))}
            </Select>
          )}
        </Field>
      </div>
      <div className="flex flex-wrap items-center gap-2">
        <Segmented<CompareMode>
          label="Comparison mode"
          value={s.mode}
          options={(['side-by-side', 'slider', 'strip'] as const).map((m) => ({ value: m, label: MODE_LABEL[m] }))}
          onChange={(m) => set({ mode: m === 'side-by-side' ? null : m })}
        />
        <Toggle pressed={s.aligned} onChange={(v) => set({ src: v ? null : 'original' })}>
          Aligned
        </Toggle>
        <Toggle pressed={s.landmarks} onChange={(v) => set({ lm: v ? '1' : null })}>
          Landmarks
        </Toggle>
      </div>

      {pair.data && !pair.data.comparable && <PairNotes pair={pair.data} compact />}

      <CompareViewer
        mode={s.mode}
        viewLabel={view.label}
        baseline={s.baseline}
        followUp={s.followUp}
        strip={s.strip}
        onPick={s.pick}
        overlay={s.landmarks ? (photo) => overlayFor(pair.data, photo, s.aligned) : undefined}
        className="h-[max(22rem,calc(100dvh-19rem))]"
      />
      {s.landmarks && s.mode === 'strip' && <p className="text-sm text-ink-muted">Landmarks are drawn on the baseline and follow-up photos.</p>}

      <div className="grid gap-4 lg:grid-cols-2">
        <Card className="p-5">
          {pair.data ? (
            <MeasurementPanel pair={pair.data} />
          ) : pair.error ? (
            <Notice tone="danger">{pair.error.message}</Notice>
          ) : !pairIds ? (
            <p className="text-ink-muted">Choose two different visits that both have this view to see the measurements and the notes on the pair.</p>
          ) : (
            <Spinner label="Measuring" />
          )}
        </Card>
        <Card className="space-y-3 p-5">
          <h3 className="text-lg font-semibold">About this pair</h3>
          {pair.data ? <PairNotes pair={pair.data} /> : <p className="text-ink-muted">—</p>}
          {pair.data && (pair.data.baseline.landmarksSource === 'manual' || pair.data.followUp.landmarksSource === 'manual') && (
            <p className="text-sm text-ink-muted">Some landmarks were placed or corrected by hand.</p>
          )}
        </Card>
      </div>

      <Card className="p-5">
        <h3 className="mb-3 text-lg font-semibold">Measurement trends</h3>
        <div ref={trendsRef} />
        {!trendsSeen ? (
          <div className="h-56" />
        ) : measurements.isPending ? (
          <Spinner label="Loading measurements" />
        ) : measurements.error ? (
          <Notice tone="danger">{measurements.error.message}</Notice>
        ) : !measurements.data ? (
          <p className="text-ink-muted">Measurements are not available yet.</p>
        ) : (
          <Suspense fallback={<Spinner label="Loading the chart" />}>
            <TrendsChart series={measurements.data} viewKey={trendView(measurements.data.views.map((v) => v.viewKey), view.key)} timeline={timeline.data} />
          </Suspense>
        )}
      </Card>

      <Card className="p-5">
        <ViewsGrid views={s.views} baseline={s.baseline.visit} followUp={s.followUp.visit} current={view.key} onView={onView} />
      </Card>

      <SheetDialog open={sheetOpen} onClose={() => setSheetOpen(false)} patient={patient} view={view} pair={pairIds} strip={s.strip} aligned={s.aligned} />
    </div>
  );
}

/** The view whose trend is drawn: the one on screen when it is measured, else frontal at rest, else lips at rest. */
function trendView(measured: string[], current: string): string {
  return [current, 'frontal-rest', 'lips-rest', ...measured].find((k) => measured.includes(k)) ?? current;
}
