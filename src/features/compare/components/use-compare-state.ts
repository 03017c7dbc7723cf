import { useCallback, useEffect, useMemo } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { prefetchImages, photoSource } from '../api/compare';
import type { CompareMode, Timeline, TimelineVisit } from '../types';
import type { Side, StripItem } from './compare-viewer';

export interface CompareParams {
  view?: string | null;
  /** Baseline visit id. */
  a?: string | null;
  /** Follow-up visit id. */
  b?: string | null;
  mode?: CompareMode | null;
  /** "original" shows the photos as taken; aligned is the default. */
  src?: 'original' | null;
  /** "1" draws the landmarks. */
  lm?: '1' | null;
}

const MODES: CompareMode[] = ['side-by-side', 'slider', 'strip'];

/**
 * The comparison chosen on screen, derived from the timeline and a few parameters (kept in the URL on the compare
 * screen, in memory in review mode). Visits are chosen by visit, not by photo, so switching views keeps them.
 */
export function useCompareState(timeline: Timeline | undefined, params: CompareParams, set: (patch: Partial<CompareParams>) => void) {
  const qc = useQueryClient();
  const views = useMemo(() => (timeline ? timeline.views.filter((v) => timeline.visits.some((x) => x.photos[v.key])) : []), [timeline]);
  const view = views.find((v) => v.key === params.view) ?? views[0] ?? null;
  const withView = useMemo(() => (timeline && view ? timeline.visits.filter((v) => v.photos[view.key]) : []), [timeline, view]);
  const visit = (id: string | null | undefined) => timeline?.visits.find((v) => v.id === id) ?? null;
  // Defaults: the first and the latest visit that have this view.
  const baseVisit: TimelineVisit | null = visit(params.a) ?? withView[0] ?? null;
  const followVisit: TimelineVisit | null = visit(params.b) ?? (withView.length > 1 ? withView[withView.length - 1] : null);
  const mode: CompareMode = params.mode && MODES.includes(params.mode) ? params.mode : 'side-by-side';
  const aligned = params.src !== 'original';
  const landmarks = params.lm === '1';

  const side = (role: Side['role'], v: TimelineVisit | null): Side => {
    const photo = v && view ? (v.photos[view.key] ?? null) : null;
    return { role, visit: v, photo, source: photo ? photoSource(photo, aligned) : null };
  };
  const baseline = side('Baseline', baseVisit);
  const followUp = side('Follow-up', followVisit);
  const strip: StripItem[] = withView.map((v) => ({ visit: v, photo: v.photos[view!.key], source: photoSource(v.photos[view!.key], aligned) }));

  // Neighbouring visits of this view are fetched ahead, so stepping through visits paints at once.
  const neighbourSrcs = useMemo(() => {
    if (!view) return [];
    const out: (string | null)[] = [];
    for (const v of [baseVisit, followVisit]) {
      const i = withView.findIndex((x) => x.id === v?.id);
      if (i < 0) continue;
      for (const j of [i - 1, i + 1]) {
        const n = withView[j];
        if (n) out.push(photoSource(n.photos[view.key], aligned)?.src ?? null);
      }
    }
    return out;
  }, [view, withView, baseVisit, followVisit, aligned]);
  useEffect(() => {
    // After the pair on screen: their requests go first.
    const t = window.setTimeout(() => prefetchImages(qc, neighbourSrcs), 50);
    return () => window.clearTimeout(t);
  }, [qc, neighbourSrcs]);

  const pick = useCallback((role: Side['role'], visitId: string) => set(role === 'Baseline' ? { a: visitId } : { b: visitId }), [set]);

  return { views, view, withView, baseline, followUp, strip, mode, aligned, landmarks, pick };
}
