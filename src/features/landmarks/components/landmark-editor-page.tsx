import { Link, useParams } from 'react-router-dom';
import { ArrowLeft } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Card, CardHeader } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { useMeasurements, usePhotoLandmarks, useResetLandmarks, useSaveLandmarks } from '../api/landmarks';
import { ALIGNMENT_LABEL } from '../types';
import { LandmarkEditor } from './landmark-editor';
import { MeasurementSummary } from './measurement-summary';

const STATE_TONE = { aligning: 'neutral', aligned: 'done', 'needs-landmarks': 'warn' } as const;

export function LandmarkEditorPage() {
  const { photoId = '' } = useParams();
  const { data, isPending, error } = usePhotoLandmarks(photoId);
  const save = useSaveLandmarks(photoId);
  const reset = useResetLandmarks(photoId);
  const measurements = useMeasurements(data?.patientId ?? '', null);
  if (isPending) return <Spinner label="Loading landmarks" />;
  if (error || !data) return <Notice tone="danger">{error?.message ?? 'Photo not found.'}</Notice>;
  const target = measurements.data?.target ?? null;
  const mutationError = save.error ?? reset.error;

  return (
    <>
      <Link to={`/patients/${data.patientId}/measurements`} className="mb-3 inline-flex min-h-11 items-center gap-2 text-ink-muted hover:text-ink">
        <ArrowLeft className="size-4" aria-hidden /> Measurements
      </Link>
      <PageHeader
        title="Landmarks"
        subtitle={
          <span className="inline-flex flex-wrap items-center gap-2">
            {data.view.label}
            <Badge tone={STATE_TONE[data.alignmentState]} data-testid="alignment-state">
              {ALIGNMENT_LABEL[data.alignmentState]}
            </Badge>
            {data.landmarks && <Badge>{data.landmarks.source === 'auto' ? 'Automatic' : 'Placed by hand'}</Badge>}
          </span>
        }
      />
      {data.alignmentNote && (
        <Notice tone="warn" className="mb-4">
          {data.alignmentNote}
        </Notice>
      )}
      {mutationError && (
        <Notice tone="danger" className="mb-4">
          {mutationError.message}
        </Notice>
      )}
      <div className="grid gap-5 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Card className="p-4">
          {data.image ? (
            <LandmarkEditor data={data} onSave={(input) => save.mutate(input)} onReset={() => reset.mutate()} saving={save.isPending} resetting={reset.isPending} />
          ) : (
            <Notice tone="warn">This photo has no display image.</Notice>
          )}
        </Card>
        <div className="flex flex-col gap-5">
          <Card>
            <CardHeader title="Aligned photo" />
            <div className="p-4">
              {data.aligned?.url ? (
                <img
                  src={data.aligned.url}
                  alt={`Aligned photo, ${data.view.label}`}
                  data-testid="aligned-photo"
                  className="mx-auto max-h-[46vh] w-auto rounded-lg bg-photo-surround"
                  style={{ aspectRatio: `${data.aligned.width} / ${data.aligned.height}` }}
                />
              ) : (
                <p className="text-sm text-ink-muted">{data.alignmentState === 'aligning' ? 'Aligning…' : 'Not aligned yet: place the anchors and save.'}</p>
              )}
              {data.warnings.length > 0 && (
                <ul className="mt-3 space-y-2">
                  {data.warnings.map((w) => (
                    <li key={w.code}>
                      <Notice tone="warn">{w.message}</Notice>
                    </li>
                  ))}
                </ul>
              )}
            </div>
          </Card>
          <Card>
            <CardHeader title="Lip measurements" />
            <div className="p-4">
              {data.measurements ? (
                <MeasurementSummary m={data.measurements} target={target} />
              ) : (
                <p className="text-sm text-ink-muted">{data.view.measured ? 'Measurements appear once the lip points are placed.' : 'This view is not measured.'}</p>
              )}
              <Notice className="mt-3">{data.caution}</Notice>
            </div>
          </Card>
        </div>
      </div>
    </>
  );
}
