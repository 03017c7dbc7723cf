import { memo, useMemo } from 'react';
import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { formatDate } from '../../../lib/format';
import type { MeasurementSeries, Timeline } from '../types';
import { ratioText } from './measurement-panel';

/** Colours come from the app's one palette (src/index.css); SVG attributes cannot read CSS variables themselves. */
function palette() {
  const css = getComputedStyle(document.documentElement);
  const get = (name: string, fallback: string) => css.getPropertyValue(name).trim() || fallback;
  return {
    ink: get('--color-ink', '#1f1c19'),
    muted: get('--color-ink-muted', '#5f584f'),
    faint: get('--color-ink-faint', '#8f877c'),
    line: get('--color-line', '#ddd4c5'),
    done: get('--color-done', '#2f6f6a'),
    warn: get('--color-warn', '#a8680c'),
    bar: get('--color-line-strong', '#c4b9a6'),
  };
}

interface Point {
  t: number;
  ratio?: number | null;
  areaPct?: number | null;
  widthPct?: number | null;
  fillerMl?: number;
}

/**
 * Measurement trends of one view over time: the upper:lower ratio against the target (a reference line), the change
 * of total vermilion area and mouth width since the first measured visit, and the filler volume of each treatment as
 * bars on the same time axis. Without recorded treatments there are no bars (never estimated).
 */
function TrendsChart({ series, viewKey, timeline }: { series: MeasurementSeries; viewKey: string; timeline: Timeline }) {
  const c = useMemo(palette, []);
  const view = series.views.find((v) => v.viewKey === viewKey);
  const treated = timeline.visits.filter((v) => v.treatment && v.treatment.fillerMl > 0);
  const data = useMemo(() => {
    const pts = new Map<number, Point>();
    const at = (iso: string) => {
      const t = Date.parse(iso);
      if (!pts.has(t)) pts.set(t, { t });
      return pts.get(t)!;
    };
    const rows = (view?.rows ?? []).filter((r) => r.visitStartsAt);
    const first = rows[0]?.measurements;
    for (const r of rows) {
      const m = r.measurements;
      const p = at(r.visitStartsAt!);
      p.ratio = m.ratio;
      const same = first && first.unit === m.unit;
      p.areaPct = same && first.totalArea.rel ? ((m.totalArea.rel - first.totalArea.rel) / first.totalArea.rel) * 100 : null;
      p.widthPct = same && first.mouthWidth.rel ? ((m.mouthWidth.rel - first.mouthWidth.rel) / first.mouthWidth.rel) * 100 : null;
    }
    for (const v of treated) at(v.startsAt).fillerMl = v.treatment!.fillerMl;
    return [...pts.values()].sort((a, b) => a.t - b.t);
  }, [view, treated]);

  if (!view || view.rows.length < 1) return <p className="text-sm text-ink-muted">No measurements of this view yet.</p>;
  const domain: [number, number] = [data[0].t - 86_400_000 * 3, data[data.length - 1].t + 86_400_000 * 3];
  const tick = (t: number) => formatDate(new Date(t).toISOString());
  const hasBars = treated.length > 0;
  const target = series.target?.value ?? null;
  const ratios = data.map((d) => d.ratio).filter((x): x is number => typeof x === 'number');
  const span = [...ratios, ...(target ? [target] : [])];
  const ratioDomain: [number, number] = [Math.max(0, Math.floor(Math.min(...span) * 10) / 10 - 0.1), Math.ceil(Math.max(...span) * 10) / 10 + 0.1];
  const axis = { fontSize: 12, fill: c.muted };

  return (
    <div className="space-y-6">
      <figure>
        <figcaption className="mb-1 text-sm font-medium">
          Upper : lower lip ratio{target ? `, target ${ratioText(target)}` : ''}
          {hasBars ? '; bars: filler per treatment (mL)' : ''}
        </figcaption>
        <div className="h-56" role="img" aria-label={`Upper to lower lip ratio over ${view.rows.length} visits${target ? `, target ${ratioText(target)}` : ''}`}>
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart data={data} margin={{ top: 8, right: hasBars ? 8 : 24, bottom: 0, left: 0 }} syncId="trends">
              <CartesianGrid stroke={c.line} strokeDasharray="3 3" vertical={false} />
              <XAxis dataKey="t" type="number" scale="time" domain={domain} tickFormatter={tick} tick={axis} minTickGap={40} />
              <YAxis yAxisId="ratio" domain={ratioDomain} tickFormatter={(v: number) => `1:${v.toFixed(1)}`} tick={axis} width={52} />
              {hasBars && <YAxis yAxisId="ml" orientation="right" tick={axis} width={40} tickFormatter={(v: number) => `${v} mL`} allowDecimals />}
              {hasBars && <Bar yAxisId="ml" dataKey="fillerMl" name="Filler (mL)" fill={c.bar} barSize={12} isAnimationActive={false} />}
              {target && <ReferenceLine yAxisId="ratio" y={target} stroke={c.warn} strokeDasharray="6 4" label={{ value: `Target ${ratioText(target)}`, position: 'insideTopLeft', fill: c.warn, fontSize: 12 }} />}
              <Line yAxisId="ratio" dataKey="ratio" name="Upper : lower" stroke={c.ink} strokeWidth={2} dot={{ r: 3 }} connectNulls isAnimationActive={false} />
              <Tooltip labelFormatter={(t) => tick(Number(t))} formatter={(v, name) => (name === 'Upper : lower' ? ratioText(Number(v), 2) : `${v} mL`)} />
            </ComposedChart>
          </ResponsiveContainer>
        </div>
      </figure>
      <figure>
        <figcaption className="mb-1 text-sm font-medium">Change since the first measured visit (%)</figcaption>
        <div className="h-48" role="img" aria-label="Change of total vermilion area and mouth width since the first measured visit">
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart data={data} margin={{ top: 8, right: hasBars ? 48 : 24, bottom: 0, left: 0 }} syncId="trends">
              <CartesianGrid stroke={c.line} strokeDasharray="3 3" vertical={false} />
              <XAxis dataKey="t" type="number" scale="time" domain={domain} tickFormatter={tick} tick={axis} minTickGap={40} />
              <YAxis tickFormatter={(v: number) => `${v > 0 ? '+' : ''}${v.toFixed(0)} %`} tick={axis} width={52} />
              <ReferenceLine y={0} stroke={c.faint} />
              <Line dataKey="areaPct" name="Total vermilion area" stroke={c.done} strokeWidth={2} dot={{ r: 3 }} connectNulls isAnimationActive={false} />
              <Line dataKey="widthPct" name="Mouth width" stroke={c.muted} strokeWidth={2} strokeDasharray="5 3" dot={{ r: 3 }} connectNulls isAnimationActive={false} />
              <Legend wrapperStyle={{ fontSize: 12 }} />
              <Tooltip labelFormatter={(t) => tick(Number(t))} formatter={(v) => `${Number(v) > 0 ? '+' : ''}${Number(v).toFixed(1)} %`} />
            </ComposedChart>
          </ResponsiveContainer>
        </div>
      </figure>
      <p className="text-xs text-ink-faint">{series.caution}</p>
    </div>
  );
}

/** Redrawn only when its data or view change, not on every pick of a visit (the chart is the heaviest part of the screen). */
export default memo(TrendsChart);
