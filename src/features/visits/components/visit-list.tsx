import { useState } from 'react';
import { Link } from 'react-router-dom';
import { CalendarPlus, ChevronRight } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { formatDate, formatTime } from '../../../lib/format';
import { usePatientVisits } from '../api/visits';
import { KindBadge, StatusBadge } from './visit-badges';
import { VisitForm } from './visit-form';

export function VisitList({ patientId, canWriteNotes }: { patientId: string; canWriteNotes: boolean }) {
  const { data, isPending } = usePatientVisits(patientId);
  const [adding, setAdding] = useState(false);
  return (
    <Card>
      <CardHeader
        title="Visits"
        action={
          <Button size="sm" variant="primary" onClick={() => setAdding(true)}>
            <CalendarPlus className="size-4" /> Book visit
          </Button>
        }
      />
      {isPending ? (
        <div className="px-5">
          <Spinner label="Loading visits" />
        </div>
      ) : !data?.length ? (
        <div className="p-5">
          <EmptyState title="No visits yet">Book a consultation to start this patient's record.</EmptyState>
        </div>
      ) : (
        <ul>
          {data.map((v) => (
            <li key={v.id} className="border-b border-line last:border-0">
              <Link to={`/visits/${v.id}`} className="flex min-h-14 items-center gap-4 px-5 py-3 hover:bg-paper-sunk/60">
                <div className="w-32 shrink-0">
                  <p className="font-medium">{formatDate(v.startsAt)}</p>
                  <p className="text-sm text-ink-faint">{formatTime(v.startsAt)}</p>
                </div>
                <div className="flex min-w-0 flex-1 flex-wrap items-center gap-2">
                  <KindBadge kind={v.kind} />
                  <StatusBadge status={v.status} />
                  <span className="truncate text-sm text-ink-muted">{v.practitionerName}</span>
                </div>
                <ChevronRight className="size-5 text-ink-faint" aria-hidden />
              </Link>
            </li>
          ))}
        </ul>
      )}
      <Dialog open={adding} onClose={() => setAdding(false)} title="Book a visit">
        <VisitForm patientId={patientId} canWriteNotes={canWriteNotes} onDone={() => setAdding(false)} />
      </Dialog>
    </Card>
  );
}
