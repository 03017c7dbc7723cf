import { useCallback, useMemo, useState, type FormEvent } from 'react';
import { Lock } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input } from '../../../components/ui/field';
import { ApiError } from '../../../lib/api-client';
import { formatDate } from '../../../lib/format';
import { useExitReview, usePair, useTimeline } from '../api/compare';
import { MODE_LABEL, SHORT_VIEW_LABEL, type CompareMode, type ReviewSetup } from '../types';
import { overlayFor, Segmented } from './compare-screen';
import { CompareViewer } from './compare-viewer';
import { MeasurementPanel } from './measurement-panel';
import { PairNotes } from './pair-notes';
import { useCompareState, type CompareParams } from './use-compare-state';

/**
 * Review mode (DESIGN §3): the comparison, full screen, for the patient. Photos large on a deep neutral grey; only
 * this patient's photos and measurements (no staff notes, no treatment details, no way to another record). The
 * patient may switch modes and views; leaving needs the staff member's password.
 */
export function ReviewScreen({ patient, setup, onLeft, onSignedOut }: { patient: { id: string; firstName: string }; setup: ReviewSetup; onLeft: () => void; onSignedOut: () => void }) {
  const timeline = useTimeline(patient.id);
  const initial = useMemo(() => {
    const visitOf = (photoId?: string) => timeline.data?.visits.find((v) => Object.values(v.photos).some((p) => p.id === photoId))?.id ?? null;
    return { view: setup.view, a: visitOf(setup.baselinePhotoId), b: visitOf(setup.followUpPhotoId), mode: setup.mode, src: setup.aligned ? null : 'original' } satisfies CompareParams;
  }, [timeline.data, setup]);
  const [patch, setPatch] = useState<Partial<CompareParams>>({});
  const params = { ...initial, ...patch };
  const set = useCallback((p: Partial<CompareParams>) => setPatch((prev) => ({ ...prev, ...p })), []);
  const s = useCompareState(timeline.data, params, set);
  const pair = usePair(patient.id, s.baseline.photo?.id ?? null, s.followUp.photo?.id ?? null);
  const [leaving, setLeaving] = useState(false);

  // Only views that show something at one of the two visits are offered.
  const views = s.views.filter((v) => s.baseline.visit?.photos[v.key] || s.followUp.visit?.photos[v.key]);

  return (
    <div className="min-h-dvh bg-photo-surround-deep text-white">
      <header className="flex flex-wrap items-center justify-between gap-3 px-4 pt-3 sm:px-6">
        <div className="min-w-0">
          <h1 className="font-display text-2xl font-semibold">{patient.firstName}, your results</h1>
          <p className="text-sm text-white/80">
            {s.view?.label ?? ''}
            {s.baseline.visit && s.followUp.visit ? ` · ${formatDate(s.baseline.visit.startsAt)} and ${formatDate(s.followUp.visit.startsAt)}` : ''}
          </p>
        </div>
        <button
          type="button"
          onClick={() => setLeaving(true)}
          className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-white/30 px-3 text-sm text-white/90 hover:bg-white/10"
        >
          <Lock className="size-4" aria-hidden /> Staff: end review
        </button>
      </header>
      <main className="space-y-3 px-4 pb-6 pt-3 sm:px-6">
        <div className="flex flex-wrap items-center gap-2">
          <Segmented<CompareMode>
            label="Comparison mode"
            tone="dark"
            value={s.mode}
            options={(['side-by-side', 'slider', 'strip'] as const).map((m) => ({ value: m, label: MODE_LABEL[m] }))}
            onChange={(m) => set({ mode: m })}
          />
          {views.length > 1 && (
            <Segmented<string> label="View" tone="dark" value={s.view?.key ?? ''} options={views.map((v) => ({ value: v.key, label: SHORT_VIEW_LABEL[v.key] ?? v.label }))} onChange={(v) => set({ view: v })} />
          )}
        </div>
        {timeline.isPending || !s.view ? (
          <p className="py-20 text-center text-white/80">{timeline.isPending ? 'Loading your photos…' : 'No photos to show.'}</p>
        ) : (
          <>
            {pair.data && !pair.data.comparable && <PairNotes pair={pair.data} tone="dark" compact />}
            <CompareViewer
              tone="dark"
              mode={s.mode}
              viewLabel={s.view.label}
              baseline={s.baseline}
              followUp={s.followUp}
              strip={s.strip}
              overlay={s.landmarks ? (photo) => overlayFor(pair.data, photo, s.aligned) : undefined}
              className="h-[max(20rem,calc(100dvh-15rem))]"
            />
            {pair.data && (
              <div className="mx-auto max-w-3xl pt-2">
                <MeasurementPanel pair={pair.data} tone="dark" />
              </div>
            )}
          </>
        )}
      </main>
      <LeaveDialog open={leaving} onClose={() => setLeaving(false)} onLeft={onLeft} onSignedOut={onSignedOut} />
    </div>
  );
}

function LeaveDialog({ open, onClose, onLeft, onSignedOut }: { open: boolean; onClose: () => void; onLeft: () => void; onSignedOut: () => void }) {
  const exit = useExitReview();
  const [password, setPassword] = useState('');
  const submit = async (e: FormEvent) => {
    e.preventDefault();
    try {
      await exit.mutateAsync(password);
      setPassword('');
      onLeft();
    } catch (err) {
      setPassword('');
      if (err instanceof ApiError && err.status === 401) onSignedOut();
    }
  };
  const error = exit.error instanceof ApiError && exit.error.status !== 401 ? exit.error.message : undefined;
  return (
    <Dialog open={open} onClose={onClose} title="End review mode">
      <form onSubmit={submit} className="space-y-4">
        <p className="text-ink-muted">For staff: enter your own password to return to the patient record.</p>
        <Field label="Your password" error={error}>
          {(p) => <Input {...p} type="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} autoFocus />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Stay in review</Button>
          <Button type="submit" variant="primary" busy={exit.isPending} disabled={!password}>
            End review
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
