import { Link } from 'react-router-dom';
import { ArrowLeft } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Spinner } from '../../../components/ui/page';
import { Notice } from '../../../components/ui/notice';
import { formatDate, formatTime } from '../../../lib/format';
import { useUpdateVisit, useVisit } from '../api/visits';
import type { VisitStatus } from '../types';
import { KindBadge, StatusBadge } from './visit-badges';

const NEXT: Partial<Record<VisitStatus, { to: VisitStatus; label: string }[]>> = {
  booked: [
    { to: 'in-progress', label: 'Start visit' },
    { to: 'cancelled', label: 'Cancel visit' },
  ],
  'in-progress': [{ to: 'completed', label: 'Complete visit' }],
};

/** Visit heading with patient, time, practitioner and the status actions. */
export function VisitHeader({ visitId }: { visitId: string }) {
  const { data: v, isPending, error } = useVisit(visitId);
  const update = useUpdateVisit(visitId);
  if (isPending) return <Spinner label="Loading visit" />;
  if (error || !v) return <Notice tone="danger">{error?.message ?? 'Visit not found.'}</Notice>;
  return (
    <header className="mb-5">
      <Link to={`/patients/${v.patientId}`} className="mb-2 inline-flex min-h-11 items-center gap-1.5 text-ink-muted hover:text-ink">
        <ArrowLeft className="size-4" /> {v.patient ? `${v.patient.firstName} ${v.patient.lastName}` : 'Patient'}
        {v.patient && <span className="font-mono text-sm text-ink-faint">{v.patient.code}</span>}
      </Link>
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 className="text-3xl font-semibold">
            {formatDate(v.startsAt)} <span className="text-ink-faint">· {formatTime(v.startsAt)}</span>
          </h1>
          <p className="mt-2 flex flex-wrap items-center gap-2 text-ink-muted">
            <KindBadge kind={v.kind} />
            <StatusBadge status={v.status} />
            <span>with {v.practitionerName}</span>
          </p>
        </div>
        <div className="flex gap-2">
          {NEXT[v.status]?.map((n) => (
            <Button key={n.to} variant={n.to === 'cancelled' ? 'ghost' : n.to === 'completed' ? 'done' : 'primary'} busy={update.isPending && update.variables?.status === n.to} onClick={() => update.mutate({ status: n.to })}>
              {n.label}
            </Button>
          ))}
        </div>
      </div>
      {update.error && (
        <Notice tone="danger" className="mt-3">
          {update.error.message}
        </Notice>
      )}
    </header>
  );
}
