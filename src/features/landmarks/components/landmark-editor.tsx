import { useCallback, useEffect, useMemo, useRef, useState, type KeyboardEvent as ReactKeyboardEvent, type PointerEvent as ReactPointerEvent } from 'react';
import { Maximize, Minus, Plus, Ruler, RotateCcw, Save, Undo2 } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import type { LandmarkViewDto, PutLandmarksInput, XY } from '../types';

/**
 * The landmark editor: drag any point (mouse, pen or touch: Pointer Events), drag an anchor to move the points it is
 * made of, place a view's anchors by tapping when the model found no face, zoom (buttons, wheel, pinch) and pan,
 * undo, reset to automatic, save. Coordinates are pixels of the photo's display image, as stored on the server.
 */

interface Draft {
  points: (XY | null)[] | null;
  anchors: XY[];
  ruler: { a: XY; b: XY; lengthMm: number } | null;
}

type Drag =
  | { kind: 'point'; index: number; pointerId: number }
  | { kind: 'anchor'; index: number; pointerId: number; start: XY; orig: (XY | null)[] }
  | { kind: 'placed'; index: number; pointerId: number }
  | { kind: 'ruler'; end: 'a' | 'b'; pointerId: number }
  | { kind: 'pan'; pointerId: number; start: XY; centre: XY };

/*
 * Lip outline template (iBUG 300-W points 48–67) in a frame where the corners are (0, 0) and (1, 0): the proportions
 * of an average closed mouth. Seeds the lip points on a close-up the model could not read, for the practitioner to
 * drag onto the real outline.
 */
const LIP_TEMPLATE: Record<number, XY> = {
  48: [0, 0], 49: [0.22, -0.11], 50: [0.39, -0.17], 51: [0.5, -0.11], 52: [0.61, -0.17], 53: [0.78, -0.11], 54: [1, 0],
  55: [0.78, 0.14], 56: [0.64, 0.21], 57: [0.5, 0.22], 58: [0.36, 0.21], 59: [0.22, 0.14],
  60: [0.06, 0], 61: [0.28, -0.01], 62: [0.5, 0], 63: [0.72, -0.01], 64: [0.94, 0], 65: [0.72, 0.01], 66: [0.5, 0.01], 67: [0.28, 0.01],
};

const clampTo = (p: XY, w: number, h: number): XY => [Math.min(w, Math.max(0, p[0])), Math.min(h, Math.max(0, p[1]))];
const mean = (ps: XY[]): XY => [ps.reduce((s, p) => s + p[0], 0) / ps.length, ps.reduce((s, p) => s + p[1], 0) / ps.length];

function initialDraft(data: LandmarkViewDto): Draft {
  const lm = data.landmarks;
  return {
    points: lm?.points ? lm.points.map((p) => (p ? [p[0], p[1]] : null)) : null,
    anchors: lm?.anchors ? lm.anchors.map((p) => [p[0], p[1]]) : [],
    ruler: lm?.ruler ? { a: [...lm.ruler.a], b: [...lm.ruler.b], lengthMm: lm.ruler.lengthMm } : null,
  };
}

export interface LandmarkEditorProps {
  data: LandmarkViewDto;
  onSave: (input: PutLandmarksInput) => void;
  onReset: () => void;
  saving?: boolean;
  resetting?: boolean;
}

export function LandmarkEditor({ data, onSave, onReset, saving, resetting }: LandmarkEditorProps) {
  const image = data.image!;
  const W = image.width, H = image.height;
  const view = data.view;
  const [draft, setDraft] = useState<Draft>(() => initialDraft(data));
  const [history, setHistory] = useState<Draft[]>([]);
  const [zoom, setZoom] = useState(1);
  const [centre, setCentre] = useState<XY>([W / 2, H / 2]);
  const [selected, setSelected] = useState<number | null>(null);
  const [confirmReset, setConfirmReset] = useState(false);
  const svgRef = useRef<SVGSVGElement>(null);
  const drag = useRef<Drag | null>(null);
  const pinch = useRef<Map<number, XY>>(new Map());
  const pinchStart = useRef<{ dist: number; zoom: number } | null>(null);

  // A new answer from the server (saved, reset, or alignment finished) replaces the draft.
  const stamp = `${data.landmarks?.editedAt ?? ''}|${data.landmarks?.source ?? ''}|${data.alignment?.rev ?? ''}|${data.alignmentState}`;
  useEffect(() => {
    setDraft(initialDraft(data));
    setHistory([]);
  }, [stamp]); // the stamp stands for the landmark content of `data`

  const usesPoints = !!draft.points && view.anchors.every((a) => a.from68.every((i) => draft.points![i]));
  /** Where each anchor is now: read from the points it is made of, or as placed. */
  const anchorPositions: (XY | null)[] = useMemo(
    () =>
      view.anchors.map((a, i) => {
        if (usesPoints) return mean(a.from68.map((k) => draft.points![k]!));
        return draft.anchors[i] ?? null;
      }),
    [view.anchors, usesPoints, draft],
  );
  const nextToPlace = usesPoints ? -1 : anchorPositions.findIndex((p) => !p);
  const complete = anchorPositions.every(Boolean);
  const dirty = history.length > 0;
  const hasLipPoints = !!draft.points && Array.from({ length: 20 }, (_, i) => 48 + i).every((i) => draft.points![i]);

  const vw = W / zoom, vh = H / zoom;
  const cx = Math.min(W - vw / 2, Math.max(vw / 2, centre[0]));
  const cy = Math.min(H - vh / 2, Math.max(vh / 2, centre[1]));
  const viewBox = `${cx - vw / 2} ${cy - vh / 2} ${vw} ${vh}`;

  /** Screen pixels per image pixel, so markers keep their size on screen whatever the zoom. */
  const [pxPerUnit, setPxPerUnit] = useState(1);
  useEffect(() => {
    const el = svgRef.current;
    if (!el) return;
    const measure = () => {
      const r = el.getBoundingClientRect();
      setPxPerUnit(Math.min(r.width / vw, r.height / vh) || 1);
    };
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, [vw, vh]);
  const u = 1 / pxPerUnit;

  const toImage = useCallback((clientX: number, clientY: number): XY => {
    const svg = svgRef.current!;
    const ctm = svg.getScreenCTM();
    if (!ctm) return [0, 0];
    const p = new DOMPoint(clientX, clientY).matrixTransform(ctm.inverse());
    return [p.x, p.y];
  }, []);

  const commit = (next: Draft) => {
    setHistory((h) => [...h.slice(-99), draft]);
    setDraft(next);
  };
  const undo = () => {
    setHistory((h) => {
      if (!h.length) return h;
      setDraft(h[h.length - 1]);
      return h.slice(0, -1);
    });
  };

  const setZoomAt = (z: number, at?: XY) => {
    const nz = Math.min(8, Math.max(1, z));
    if (at) setCentre([at[0] + ((cx - at[0]) * zoom) / nz, at[1] + ((cy - at[1]) * zoom) / nz]);
    setZoom(nz);
  };

  const startDrag = (e: ReactPointerEvent, d: Drag) => {
    e.stopPropagation();
    (e.currentTarget as Element).setPointerCapture?.(e.pointerId);
    setHistory((h) => [...h.slice(-99), draft]);
    drag.current = d;
  };

  const onPointerDownPoint = (e: ReactPointerEvent, index: number) => {
    setSelected(null);
    startDrag(e, { kind: 'point', index, pointerId: e.pointerId });
  };
  const onPointerDownAnchor = (e: ReactPointerEvent, index: number) => {
    setSelected(index);
    if (usesPoints) startDrag(e, { kind: 'anchor', index, pointerId: e.pointerId, start: toImage(e.clientX, e.clientY), orig: draft.points! });
    else startDrag(e, { kind: 'placed', index, pointerId: e.pointerId });
  };

  const onPointerDownBackground = (e: ReactPointerEvent<SVGSVGElement>) => {
    pinch.current.set(e.pointerId, [e.clientX, e.clientY]);
    if (pinch.current.size === 2) {
      const [a, b] = [...pinch.current.values()];
      pinchStart.current = { dist: Math.hypot(a[0] - b[0], a[1] - b[1]), zoom };
      drag.current = null;
      return;
    }
    const at = toImage(e.clientX, e.clientY);
    if (nextToPlace >= 0 && at[0] >= 0 && at[1] >= 0 && at[0] <= W && at[1] <= H) {
      const anchors = [...draft.anchors];
      anchors[nextToPlace] = at;
      commit({ ...draft, anchors });
      setSelected(nextToPlace);
      return;
    }
    e.currentTarget.setPointerCapture?.(e.pointerId);
    drag.current = { kind: 'pan', pointerId: e.pointerId, start: [e.clientX, e.clientY], centre: [cx, cy] };
  };

  const onPointerMove = (e: ReactPointerEvent<SVGSVGElement>) => {
    if (pinch.current.has(e.pointerId)) pinch.current.set(e.pointerId, [e.clientX, e.clientY]);
    if (pinch.current.size === 2 && pinchStart.current) {
      const [a, b] = [...pinch.current.values()];
      setZoomAt((pinchStart.current.zoom * Math.hypot(a[0] - b[0], a[1] - b[1])) / pinchStart.current.dist);
      return;
    }
    const d = drag.current;
    if (!d || d.pointerId !== e.pointerId) return;
    if (d.kind === 'pan') {
      setCentre([d.centre[0] - (e.clientX - d.start[0]) * u, d.centre[1] - (e.clientY - d.start[1]) * u]);
      return;
    }
    const at = clampTo(toImage(e.clientX, e.clientY), W, H);
    setDraft((cur) => {
      if (d.kind === 'point' && cur.points) {
        const points = [...cur.points];
        points[d.index] = at;
        return { ...cur, points };
      }
      if (d.kind === 'anchor' && cur.points) {
        const delta: XY = [at[0] - d.start[0], at[1] - d.start[1]];
        const points = [...cur.points];
        for (const k of view.anchors[d.index].from68) {
          const o = d.orig[k];
          if (o) points[k] = clampTo([o[0] + delta[0], o[1] + delta[1]], W, H);
        }
        return { ...cur, points };
      }
      if (d.kind === 'placed') {
        const anchors = [...cur.anchors];
        anchors[d.index] = at;
        return { ...cur, anchors };
      }
      if (d.kind === 'ruler' && cur.ruler) return { ...cur, ruler: { ...cur.ruler, [d.end]: at } };
      return cur;
    });
  };

  const onPointerUp = (e: ReactPointerEvent<SVGSVGElement>) => {
    pinch.current.delete(e.pointerId);
    if (pinch.current.size < 2) pinchStart.current = null;
    if (drag.current?.pointerId === e.pointerId) drag.current = null;
  };

  // Wheel zoom needs a non-passive listener, or the page scrolls along with the zoom.
  const wheel = useRef<(e: WheelEvent) => void>(() => undefined);
  wheel.current = (e: WheelEvent) => {
    e.preventDefault();
    setZoomAt(zoom * (e.deltaY < 0 ? 1.25 : 0.8), toImage(e.clientX, e.clientY));
  };
  useEffect(() => {
    const el = svgRef.current;
    if (!el) return;
    const on = (e: WheelEvent) => wheel.current(e);
    el.addEventListener('wheel', on, { passive: false });
    return () => el.removeEventListener('wheel', on);
  }, []);

  const onKeyDown = (e: ReactKeyboardEvent) => {
    if ((e.ctrlKey || e.metaKey) && e.key.toLowerCase() === 'z') {
      e.preventDefault();
      undo();
      return;
    }
    if (selected === null) return;
    const step = e.shiftKey ? 10 : 1;
    const delta: Record<string, XY> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
    const dxy = delta[e.key];
    if (!dxy) return;
    e.preventDefault();
    if (usesPoints && draft.points) {
      const points = [...draft.points];
      for (const k of view.anchors[selected].from68) {
        const o = points[k];
        if (o) points[k] = clampTo([o[0] + dxy[0], o[1] + dxy[1]], W, H);
      }
      commit({ ...draft, points });
    } else if (draft.anchors[selected]) {
      const anchors = [...draft.anchors];
      anchors[selected] = clampTo([anchors[selected][0] + dxy[0], anchors[selected][1] + dxy[1]], W, H);
      commit({ ...draft, anchors });
    }
  };

  const addRuler = () => commit({ ...draft, ruler: { a: [W * 0.35, H * 0.9], b: [W * 0.65, H * 0.9], lengthMm: 10 } });
  const addLipOutline = () => {
    const [r, l] = anchorPositions as XY[];
    const dx = l[0] - r[0], dy = l[1] - r[1];
    const points: (XY | null)[] = draft.points ? [...draft.points] : Array.from({ length: 68 }, () => null);
    for (const [k, [tx, ty]] of Object.entries(LIP_TEMPLATE)) points[Number(k)] = clampTo([r[0] + tx * dx - ty * dy, r[1] + tx * dy + ty * dx], W, H);
    commit({ points, anchors: anchorPositions as XY[], ruler: draft.ruler });
  };

  const save = () => {
    const ruler = draft.ruler ? { a: draft.ruler.a, b: draft.ruler.b, lengthMm: draft.ruler.lengthMm } : null;
    if (usesPoints) onSave({ points: draft.points, ruler });
    else onSave({ points: draft.points, anchors: anchorPositions as XY[], ruler });
  };

  const r = 3.5 * u;
  return (
    <div className="flex flex-col gap-3" onKeyDown={onKeyDown}>
      <div className="flex flex-wrap items-center gap-2" role="toolbar" aria-label="Landmark tools">
        <Button size="icon" aria-label="Zoom in" onClick={() => setZoomAt(zoom * 1.5)}>
          <Plus className="size-5" />
        </Button>
        <Button size="icon" aria-label="Zoom out" onClick={() => setZoomAt(zoom / 1.5)}>
          <Minus className="size-5" />
        </Button>
        <Button size="icon" aria-label="Fit the photo" onClick={() => setZoomAt(1)}>
          <Maximize className="size-5" />
        </Button>
        <span className="px-1 text-sm text-ink-muted" aria-live="polite">
          {Math.round(zoom * 100)} %
        </span>
        <Button onClick={undo} disabled={!history.length}>
          <Undo2 className="size-4" /> Undo
        </Button>
        {draft.ruler ? (
          <label className="inline-flex min-h-11 items-center gap-2 text-sm">
            <Ruler className="size-4" aria-hidden /> Ruler length
            <input
              type="number"
              min={1}
              max={1000}
              step={0.5}
              value={draft.ruler.lengthMm}
              onChange={(e) => commit({ ...draft, ruler: { ...draft.ruler!, lengthMm: Number(e.target.value) } })}
              className="min-h-11 w-20 rounded-lg border border-line-strong bg-paper-raised px-2"
            />
            mm
            <Button size="sm" variant="ghost" onClick={() => commit({ ...draft, ruler: null })}>
              Remove
            </Button>
          </label>
        ) : (
          <Button onClick={addRuler}>
            <Ruler className="size-4" /> Add ruler
          </Button>
        )}
        {view.kind === 'lips' && complete && !hasLipPoints && (
          <Button onClick={addLipOutline}>Add lip outline</Button>
        )}
        <span className="grow" />
        {confirmReset ? (
          <>
            <Button variant="danger" busy={resetting} onClick={() => { setConfirmReset(false); onReset(); }}>
              Confirm reset
            </Button>
            <Button variant="ghost" onClick={() => setConfirmReset(false)}>
              Keep edits
            </Button>
          </>
        ) : (
          <Button variant="ghost" onClick={() => setConfirmReset(true)} disabled={resetting}>
            <RotateCcw className="size-4" /> Reset to automatic
          </Button>
        )}
        <Button variant="primary" onClick={save} busy={saving} disabled={!dirty || !complete}>
          <Save className="size-4" /> Save landmarks
        </Button>
      </div>

      {nextToPlace >= 0 && (
        <p className="rounded-lg bg-warn-soft px-3 py-2 text-sm text-[#6f4507]" role="status">
          Tap the photo to place: <strong>{view.anchors[nextToPlace].label}</strong> ({nextToPlace + 1} of {view.anchors.length})
        </p>
      )}

      <svg
        ref={svgRef}
        role="application"
        aria-label={`Landmarks on the photo, ${view.label}`}
        tabIndex={0}
        viewBox={viewBox}
        preserveAspectRatio="xMidYMid meet"
        className="h-[min(68vh,760px)] w-full touch-none select-none rounded-lg bg-photo-surround"
        onPointerDown={onPointerDownBackground}
        onPointerMove={onPointerMove}
        onPointerUp={onPointerUp}
        onPointerCancel={onPointerUp}
      >
        <image href={image.url ?? undefined} x={0} y={0} width={W} height={H} preserveAspectRatio="none" />
        {draft.ruler && (
          <g data-testid="ruler">
            <line x1={draft.ruler.a[0]} y1={draft.ruler.a[1]} x2={draft.ruler.b[0]} y2={draft.ruler.b[1]} stroke="#f2b84b" strokeWidth={2 * u} />
            {(['a', 'b'] as const).map((end) => (
              <circle
                key={end}
                cx={draft.ruler![end][0]}
                cy={draft.ruler![end][1]}
                r={9 * u}
                fill="#f2b84b"
                fillOpacity={0.35}
                stroke="#f2b84b"
                strokeWidth={2 * u}
                className="cursor-grab"
                aria-label={`Ruler end ${end === 'a' ? 1 : 2}`}
                onPointerDown={(e) => startDrag(e, { kind: 'ruler', end, pointerId: e.pointerId })}
              />
            ))}
          </g>
        )}
        {draft.points?.map((p, i) =>
          p ? (
            <g key={i}>
              <circle cx={p[0]} cy={p[1]} r={r} fill={i >= 48 ? '#ffffff' : '#dff3ef'} stroke="#1f1c19" strokeWidth={1.2 * u} pointerEvents="none" />
              <circle
                cx={p[0]}
                cy={p[1]}
                r={Math.max(r * 2.4, 10 * u)}
                fill="transparent"
                className="cursor-grab"
                data-landmark={i}
                onPointerDown={(e) => onPointerDownPoint(e, i)}
              />
            </g>
          ) : null,
        )}
        {anchorPositions.map((p, i) =>
          p ? (
            <g key={`a${i}`} data-anchor={view.anchors[i].key}>
              <circle cx={p[0]} cy={p[1]} r={12 * u} fill="none" stroke="#2f6f6a" strokeWidth={3 * u} pointerEvents="none" />
              <path d={`M${p[0] - 6 * u} ${p[1]}H${p[0] + 6 * u}M${p[0]} ${p[1] - 6 * u}V${p[1] + 6 * u}`} stroke="#ffffff" strokeWidth={1.5 * u} pointerEvents="none" />
              <circle
                cx={p[0]}
                cy={p[1]}
                r={22 * u}
                fill={selected === i ? 'rgba(47,111,106,0.25)' : 'transparent'}
                className="cursor-move"
                role="button"
                aria-label={`Anchor: ${view.anchors[i].label}`}
                onPointerDown={(e) => onPointerDownAnchor(e, i)}
              />
            </g>
          ) : null,
        )}
      </svg>
      <p className="text-sm text-ink-muted">
        Drag a ringed anchor to move it ({usesPoints ? 'its points move with it' : 'placed by hand'}), or any dot to correct one point. Arrow keys nudge the
        selected anchor. Zoom with the buttons, the mouse wheel or two fingers.
      </p>
    </div>
  );
}
