import { Fragment, useState } from 'react';
import { Link } from 'react-router-dom';
import { Eye, EyeOff, Pencil } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useMeasurements, useSetLipRatioTarget } from '../api/landmarks';
import { formatAngle, formatArea, formatChange, formatLength, formatRatio, scaleNote } from '../format';
import type { MeasurementsDto } from '../types';
import { LandmarkOverlay } from './landmark-overlay';

/** The patient's target upper:lower ratio: one of the published proportions, a custom one, or none. */
function TargetPicker({ patientId, data }: { patientId: string; data: MeasurementsDto }) {
  const set = useSetLipRatioTarget(patientId);
  const [custom, setCustom] = useState(data.target?.key === 'custom' ? String(data.target.value) : '');
  const current = data.target?.key ?? 'none';
  return (
    <div className="flex flex-col gap-2">
      <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Target lip ratio">
        {data.presets.map((p) => (
          <Button key={p.key} variant={current === p.key ? 'done' : 'secondary'} aria-pressed={current === p.key} onClick={() => set.mutate({ target: p.key })} busy={set.isPending && set.variables?.target === p.key}>
            {p.key}
          </Button>
        ))}
        <form
          className="inline-flex items-center gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            set.mutate({ target: 'custom', value: Number(custom) });
          }}
        >
          <label className="inline-flex items-center gap-1 text-sm">
            Custom 1:
            <input
              inputMode="decimal"
              value={custom}
              onChange={(e) => setCustom(e.target.value)}
              aria-label="Custom ratio, lower lip per upper lip"
              className={cn('min-h-11 w-20 rounded-lg border border-line-strong bg-paper-raised px-2', current === 'custom' && 'border-done')}
            />
          </label>
          <Button type="submit" disabled={!custom}>
            Set
          </Button>
        </form>
        <Button variant="ghost" aria-pressed={current === 'none'} onClick={() => set.mutate({ target: 'none' })}>
          No target
        </Button>
      </div>
      {set.error && <Notice tone="danger">{set.error.message}</Notice>}
      <p className="text-xs text-ink-faint">
        Published proportions: 1:1.6 as an “ideal” in young adults (Acta Otorhinolaryngol Ital 2018); 1:2 rated most attractive (Popenko et al., JAMA Facial
        Plast Surg 2017); many patients prefer equal lips (Heidekrueger et al., J Craniomaxillofac Surg 2017).
      </p>
    </div>
  );
}

export function MeasurementsPanel({ patientId }: { patientId: string }) {
  const [baseline, setBaseline] = useState<string | null>(null);
  const { data, isPending, error } = useMeasurements(patientId, baseline);
  const [shown, setShown] = useState<string | null>(null);
  if (isPending) return <Spinner label="Loading measurements" />;
  if (error || !data) return <Notice tone="danger">{error?.message ?? 'Measurements could not be loaded.'}</Notice>;
  const visits = new Map<string, string>();
  for (const v of data.views) for (const r of v.rows) visits.set(r.visitId, r.visitStartsAt ?? r.capturedAt);
  const targetText = data.target ? (data.target.key === 'custom' ? `1:${data.target.value}` : data.target.key) : 'none';

  return (
    <div className="flex flex-col gap-5">
      <Notice tone="warn" title="Guides, not treatment targets">
        {data.caution}
      </Notice>
      <Card>
        <CardHeader title={`Target ratio: ${targetText}`} />
        <div className="p-4">
          <TargetPicker key={data.target?.value ?? 'none'} patientId={patientId} data={data} />
        </div>
      </Card>
      {data.views.length === 0 ? (
        <EmptyState title="No measurements yet">Measurements come from the frontal (at rest) and lips close-up photos once their landmarks are placed.</EmptyState>
      ) : (
        <>
          <label className="inline-flex items-center gap-2 text-sm">
            Compare with
            <select
              value={baseline ?? ''}
              onChange={(e) => setBaseline(e.target.value || null)}
              className="min-h-11 rounded-lg border border-line-strong bg-paper-raised px-2"
            >
              <option value="">the first visit</option>
              {[...visits].map(([id, at]) => (
                <option key={id} value={id}>
                  the visit of {formatDate(at)}
                </option>
              ))}
            </select>
          </label>
          {data.views.map((v) => (
            <Card key={v.viewKey} data-testid={`measurements-${v.viewKey}`}>
              <CardHeader title={v.label} />
              <div className="overflow-x-auto">
                <table className="w-full min-w-[860px] text-sm">
                  <thead className="text-left text-ink-muted">
                    <tr className="border-b border-line">
                      <th className="px-4 py-2 font-medium">Visit</th>
                      <th className="px-3 py-2 font-medium">Ratio (target {targetText})</th>
                      <th className="px-3 py-2 font-medium">Upper</th>
                      <th className="px-3 py-2 font-medium">Lower</th>
                      <th className="px-3 py-2 font-medium">Mouth width</th>
                      <th className="px-3 py-2 font-medium">Corner angles R / L</th>
                      <th className="px-3 py-2 font-medium">Total area</th>
                      <th className="px-3 py-2 font-medium">Since baseline</th>
                      <th className="px-3 py-2" />
                    </tr>
                  </thead>
                  <tbody>
                    {v.rows.map((r) => {
                      const m = r.measurements;
                      const open = shown === r.photoId;
                      return (
                        <Fragment key={r.photoId}>
                          <tr className="border-b border-line align-top" data-photo={r.photoId}>
                            <td className="px-4 py-2">
                              <div className="font-medium">{formatDate(r.visitStartsAt ?? r.capturedAt)}</div>
                              <div className="mt-0.5 flex flex-wrap gap-1">
                                {r.isBaseline && <Badge tone="accent">Baseline</Badge>}
                                <Badge>{r.landmarksSource === 'manual' ? 'Placed by hand' : 'Automatic'}</Badge>
                              </div>
                            </td>
                            <td className="px-3 py-2 font-medium tabular-nums">{formatRatio(m.ratio)}</td>
                            <td className="px-3 py-2 tabular-nums">{formatLength(m, m.upperHeight)}</td>
                            <td className="px-3 py-2 tabular-nums">{formatLength(m, m.lowerHeight)}</td>
                            <td className="px-3 py-2 tabular-nums">{formatLength(m, m.mouthWidth)}</td>
                            <td className="px-3 py-2 tabular-nums">
                              {formatAngle(m.commissureAngle.right)} / {formatAngle(m.commissureAngle.left)}
                            </td>
                            <td className="px-3 py-2 tabular-nums">{formatArea(m, m.totalArea)}</td>
                            <td className="px-3 py-2 tabular-nums text-ink-muted">
                              {r.change ? (
                                <>
                                  <div>upper {formatChange(r.change.upperHeight)}</div>
                                  <div>lower {formatChange(r.change.lowerHeight)}</div>
                                  <div>area {formatChange(r.change.totalArea, 3)}</div>
                                </>
                              ) : (
                                '—'
                              )}
                            </td>
                            <td className="px-3 py-2">
                              <div className="flex gap-1">
                                <Button size="sm" variant="ghost" aria-expanded={open} onClick={() => setShown(open ? null : r.photoId)}>
                                  {open ? <EyeOff className="size-4" /> : <Eye className="size-4" />} Landmarks
                                </Button>
                                <Link to={`/photos/${r.photoId}/landmarks`} className="inline-flex min-h-9 items-center gap-1 rounded-lg px-3 text-sm text-ink-muted hover:bg-paper-sunk hover:text-ink">
                                  <Pencil className="size-4" aria-hidden /> Edit
                                </Link>
                              </div>
                            </td>
                          </tr>
                          {open && (
                            <tr className="border-b border-line">
                              <td colSpan={9} className="px-4 py-3">
                                <LandmarkOverlay photoId={r.photoId} />
                                <p className="mt-2 text-xs text-ink-faint">{scaleNote(m)}</p>
                              </td>
                            </tr>
                          )}
                        </Fragment>
                      );
                    })}
                  </tbody>
                </table>
              </div>
            </Card>
          ))}
        </>
      )}
    </div>
  );
}
