import type { ReactNode } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { ChevronLeft, ChevronRight } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { formatTime } from '../../../lib/format';
import { useClinicDay } from '../api/visits';
import { KindBadge, StatusBadge } from './visit-badges';

const localToday = () => {
  const d = new Date();
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
};
const shift = (day: string, by: number) => new Date(Date.parse(`${day}T12:00:00Z`) + by * 86_400_000).toISOString().slice(0, 10);

/**
 * Today's visits per practitioner: the clinic day overview. Route files add what other features know about the
 * day through the slots (e.g. open items under each visit, reminders below).
 */
export function ClinicDayPage({ visitExtra, footer }: { visitExtra?: (visitId: string, date: string) => ReactNode; footer?: (date: string) => ReactNode } = {}) {
  const [params, setParams] = useSearchParams();
  const date = params.get('date') ?? localToday();
  const { data, isPending, error } = useClinicDay(date);
  const setDate = (d: string) => setParams(d === localToday() ? {} : { date: d });
  const label = new Date(`${date}T12:00:00Z`).toLocaleDateString('en-GB', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });
  const count = data?.practitioners.reduce((n, p) => n + p.visits.length, 0) ?? 0;

  return (
    <>
      <PageHeader
        title="Clinic day"
        subtitle={`${label}${data ? ` · ${count} ${count === 1 ? 'visit' : 'visits'}` : ''}`}
        actions={
          <div className="flex items-center gap-2">
            <Button size="icon" aria-label="Previous day" onClick={() => setDate(shift(date, -1))}>
              <ChevronLeft className="size-5" />
            </Button>
            <Input type="date" aria-label="Day" value={date} onChange={(e) => e.target.value && setDate(e.target.value)} className="w-44" />
            <Button size="icon" aria-label="Next day" onClick={() => setDate(shift(date, 1))}>
              <ChevronRight className="size-5" />
            </Button>
            {date !== localToday() && <Button onClick={() => setDate(localToday())}>Today</Button>}
          </div>
        }
      />
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Loading the day" />
      ) : !data?.practitioners.length ? (
        <EmptyState title="No visits booked for this day" />
      ) : (
        <div className="grid gap-4 md:grid-cols-2">
          {data.practitioners.map((group) => (
            <Card key={group.practitionerId}>
              <div className="flex items-baseline justify-between border-b border-line px-5 py-3">
                <h2 className="text-lg font-semibold">{group.practitionerName}</h2>
                <span className="text-sm text-ink-faint">{group.visits.length} booked</span>
              </div>
              <ol>
                {group.visits.map((v) => (
                  <li key={v.id} className="border-b border-line last:border-0">
                    <Link to={`/visits/${v.id}`} className="flex min-h-16 items-center gap-4 px-5 py-3 hover:bg-paper-sunk/60">
                      <span className="w-14 shrink-0 font-mono text-lg tabular-nums">{formatTime(v.startsAt)}</span>
                      <span className="min-w-0 flex-1">
                        <span className="block truncate font-medium">
                          {v.patient?.firstName} {v.patient?.lastName}
                        </span>
                        <span className="mt-1 flex flex-wrap items-center gap-1.5">
                          <KindBadge kind={v.kind} />
                          <StatusBadge status={v.status} />
                          <span className="font-mono text-xs text-ink-faint">{v.patient?.code}</span>
                        </span>
                        {visitExtra?.(v.id, date)}
                      </span>
                    </Link>
                  </li>
                ))}
              </ol>
            </Card>
          ))}
        </div>
      )}
      {footer?.(date)}
    </>
  );
}
