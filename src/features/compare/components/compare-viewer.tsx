import { useLayoutEffect, useRef, useState, type ReactNode } from 'react';
import * as Slider from 'react-compare-slider/components';
import { useReactCompareSlider } from 'react-compare-slider/hooks';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useImage, type PhotoSource } from '../api/compare';
import type { CompareMode, TimelinePhoto, TimelineVisit } from '../types';
import { PhotoFrame } from './photo-frame';
import { useContainFit } from './use-contain-fit';

export interface Side {
  role: 'Baseline' | 'Follow-up';
  visit: TimelineVisit | null;
  photo: TimelinePhoto | null;
  source: PhotoSource | null;
}

export interface StripItem {
  visit: TimelineVisit;
  photo: TimelinePhoto;
  source: PhotoSource | null;
}

const KIND_LABEL: Record<TimelineVisit['kind'], string> = { consultation: 'Consultation', treatment: 'Treatment', review: 'Review', 'follow-up': 'Follow-up' };

export const sideAlt = (viewLabel: string, s: Side) => `${s.role}: ${viewLabel}, ${s.visit ? formatDate(s.visit.startsAt) : 'no visit chosen'}`;

/**
 * The comparison itself, in one of three modes. `overlay` draws on top of a photo in that photo's own pixel
 * coordinates (landmarks); `tone` is "dark" in review mode, where everything around the photos is deep grey.
 */
export function CompareViewer({
  mode,
  viewLabel,
  baseline,
  followUp,
  strip,
  overlay,
  onPick,
  className,
  tone = 'light',
}: {
  mode: CompareMode;
  viewLabel: string;
  baseline: Side;
  followUp: Side;
  strip: StripItem[];
  overlay?: (photo: TimelinePhoto, source: PhotoSource) => ReactNode;
  onPick?: (role: Side['role'], visitId: string) => void;
  className?: string;
  tone?: 'light' | 'dark';
}) {
  const caption = (s: Side) => (
    <figcaption className={cn('flex items-baseline justify-between gap-2 px-1 pt-2 text-sm', tone === 'dark' ? 'text-white/90' : 'text-ink-muted')}>
      <span className={cn('font-semibold', tone === 'dark' ? 'text-white' : 'text-ink')}>{s.role}</span>
      <span>{s.visit ? `${formatDate(s.visit.startsAt)} · ${KIND_LABEL[s.visit.kind]}` : 'Choose a visit'}</span>
    </figcaption>
  );
  const over = (s: Side) => (overlay && s.photo && s.source ? overlay(s.photo, s.source) : undefined);

  const ratio = baseline.source ? baseline.source.width / baseline.source.height : followUp.source ? followUp.source.width / followUp.source.height : null;
  const { ref, maxHeight } = useCapHeight<HTMLDivElement>(ratio, mode === 'side-by-side' ? 2 : 1);

  if (mode === 'strip') {
    return <Strip items={strip} viewLabel={viewLabel} baselineId={baseline.visit?.id} followUpId={followUp.visit?.id} onPick={onPick} overlay={overlay} tone={tone} />;
  }
  if (mode === 'slider') {
    return (
      <figure ref={ref} style={{ maxHeight }} className={cn('flex min-h-0 flex-col', className)} aria-label={`${viewLabel}: slider between baseline and follow-up`}>
        <SliderPair baseline={baseline} followUp={followUp} viewLabel={viewLabel} over={over} />
        <figcaption className={cn('flex justify-between gap-2 px-1 pt-2 text-sm', tone === 'dark' ? 'text-white/90' : 'text-ink-muted')}>
          <span>
            <span className={cn('font-semibold', tone === 'dark' ? 'text-white' : 'text-ink')}>Baseline</span> {baseline.visit ? formatDate(baseline.visit.startsAt) : '—'} (left)
          </span>
          <span>
            (right) <span className={cn('font-semibold', tone === 'dark' ? 'text-white' : 'text-ink')}>Follow-up</span> {followUp.visit ? formatDate(followUp.visit.startsAt) : '—'}
          </span>
        </figcaption>
      </figure>
    );
  }
  return (
    <div ref={ref} style={{ maxHeight }} className={cn('grid min-h-0 grid-cols-2 gap-2', className)}>
      {[baseline, followUp].map((s) => (
        <figure key={s.role} className="flex min-h-0 flex-col">
          <PhotoFrame source={s.source} alt={sideAlt(viewLabel, s)} eager className="min-h-0 flex-1 rounded-lg" overlay={over(s)} />
          {caption(s)}
        </figure>
      ))}
    </div>
  );
}

/**
 * No taller than the photos need at the available width (plus their captions), so a tall screen does not wrap a
 * photo in bands of grey.
 */
function useCapHeight<T extends HTMLElement>(ratio: number | null, across: number) {
  const ref = useRef<T>(null);
  const [maxHeight, setMaxHeight] = useState<number | undefined>(undefined);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el || !ratio) return;
    const fit = () => setMaxHeight(Math.ceil((el.clientWidth - (across - 1) * 8) / across / ratio + 36));
    fit();
    const ro = new ResizeObserver(fit);
    ro.observe(el);
    return () => ro.disconnect();
  }, [ratio, across]);
  return { ref, maxHeight };
}

/**
 * Slider: the two photos stacked, the follow-up revealed to the right of the divider. The divider is a focusable
 * slider (arrow keys) and follows a finger or mouse dragged from its handle.
 */
function SliderPair({ baseline, followUp, viewLabel, over }: { baseline: Side; followUp: Side; viewLabel: string; over: (s: Side) => ReactNode }) {
  const a = useImage(baseline.source?.src ?? null);
  const b = useImage(followUp.source?.src ?? null);
  const ratio = baseline.source ? baseline.source.width / baseline.source.height : followUp.source ? followUp.source.width / followUp.source.height : null;
  const { ref, box } = useContainFit<HTMLDivElement>(ratio);
  const ready = (!baseline.source || a.isSuccess) && (!followUp.source || b.isSuccess);
  return (
    <div ref={ref} className="grid min-h-0 flex-1 place-items-center overflow-hidden rounded-lg bg-photo-surround">
      {!ready || !box ? (
        <span className="size-7 animate-spin rounded-full border-2 border-white/50 border-r-transparent" role="status" aria-label="Loading photos" />
      ) : (
        <div style={{ width: box.width, height: box.height }}>
          <SliderBody baseline={baseline} followUp={followUp} viewLabel={viewLabel} over={over} />
        </div>
      )}
    </div>
  );
}

/**
 * Mounted only once both photos are ready: the slider hook finds its handle on its first layout pass, which is when
 * it binds the pointer listeners (a handle that appears later would never follow a drag).
 */
function SliderBody({ baseline, followUp, viewLabel, over }: { baseline: Side; followUp: Side; viewLabel: string; over: (s: Side) => ReactNode }) {
  const slider = useReactCompareSlider({ keyboardIncrement: '2%', onlyHandleDraggable: true });
  const img = (s: Side) =>
    s.source ? (
      <div className="relative size-full">
        <img src={s.source.src} alt={sideAlt(viewLabel, s)} data-photo-src={s.source.src} draggable={false} className="block size-full select-none object-contain" />
        {over(s)}
      </div>
    ) : (
      <div className="grid size-full place-items-center text-sm text-white/85">No photo at this visit</div>
    );
  return (
    <Slider.Provider {...slider}>
      <Slider.Root style={{ width: '100%', height: '100%' }} data-testid="compare-slider">
        <Slider.Item item="itemOne">{img(baseline)}</Slider.Item>
        <Slider.Item item="itemTwo">{img(followUp)}</Slider.Item>
        <Slider.HandleRoot aria-label="Divider between baseline and follow-up. Use the arrow keys or drag the handle.">
          <Slider.Handle buttonStyle={{ width: '3rem', height: '3rem', backgroundColor: 'rgba(0,0,0,0.35)' }} />
        </Slider.HandleRoot>
      </Slider.Root>
    </Slider.Provider>
  );
}

/** Every visit of the view, oldest first, at one height: the course of treatment at a glance. */
function Strip({
  items,
  viewLabel,
  baselineId,
  followUpId,
  onPick,
  overlay,
  className,
  tone,
}: {
  items: StripItem[];
  viewLabel: string;
  baselineId?: string;
  followUpId?: string;
  onPick?: (role: Side['role'], visitId: string) => void;
  overlay?: (photo: TimelinePhoto, source: PhotoSource) => ReactNode;
  className?: string;
  tone: 'light' | 'dark';
}) {
  // Frames as tall as the screen leaves room for (header, controls, date and buttons), each in its photo's shape.
  const [screen, setScreen] = useState(() => ({ w: window.innerWidth, h: window.innerHeight }));
  useLayoutEffect(() => {
    const fit = () => setScreen({ w: window.innerWidth, h: window.innerHeight });
    window.addEventListener('resize', fit);
    return () => window.removeEventListener('resize', fit);
  }, []);
  const photoH = Math.max(240, screen.h - (tone === 'dark' ? 300 : 400));
  if (!items.length) return <p className={cn('p-6', tone === 'dark' ? 'text-white/85' : 'text-ink-muted')}>No photos of this view yet.</p>;
  return (
    <ol className={cn('flex snap-x items-start gap-3 overflow-x-auto pb-2', className)} aria-label={`${viewLabel}: every visit in time order`}>
      {items.map((it) => {
        const isBase = it.visit.id === baselineId;
        const isFollow = it.visit.id === followUpId;
        return (
          // Each frame takes its photo's own shape, no taller than the strip leaves room for (the date and buttons below).
          <li
            key={it.visit.id}
            className="flex shrink-0 snap-start flex-col"
            style={{ width: Math.max(160, Math.min(screen.w * 0.42, photoH * (it.source ? it.source.width / it.source.height : 0.8))) }}
          >
            <PhotoFrame
              source={it.source}
              alt={`${viewLabel}, ${formatDate(it.visit.startsAt)}`}
              className="w-full rounded-lg"
              style={{ aspectRatio: it.source ? `${it.source.width} / ${it.source.height}` : '4 / 5' }}
              overlay={overlay && it.source ? overlay(it.photo, it.source) : undefined}
            />
            <p className={cn('px-1 pt-2 text-sm', tone === 'dark' ? 'text-white/90' : 'text-ink-muted')}>
              <span className={cn('font-semibold', tone === 'dark' ? 'text-white' : 'text-ink')}>{formatDate(it.visit.startsAt)}</span> · {KIND_LABEL[it.visit.kind]}
            </p>
            {onPick && (
              <div className="mt-1 grid grid-cols-2 gap-1">
                <button
                  type="button"
                  aria-pressed={isBase}
                  onClick={() => onPick('Baseline', it.visit.id)}
                  className={cn('min-h-11 rounded-md border text-sm', isBase ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk')}
                  aria-label={`Use ${formatDate(it.visit.startsAt)} as baseline`}
                >
                  Baseline
                </button>
                <button
                  type="button"
                  aria-pressed={isFollow}
                  onClick={() => onPick('Follow-up', it.visit.id)}
                  className={cn('min-h-11 rounded-md border text-sm', isFollow ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk')}
                  aria-label={`Use ${formatDate(it.visit.startsAt)} as follow-up`}
                >
                  Follow-up
                </button>
              </div>
            )}
          </li>
        );
      })}
    </ol>
  );
}
