import { useState } from 'react';
import { Link } from 'react-router-dom';
import { BellRing, PhoneCall } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { formatDate } from '../../../lib/format';
import { useCancelReminder, useOpenItems, useReminders, type ReminderView } from '../api/treatments';

const addDays = (day: string, n: number) => new Date(Date.parse(`${day}T12:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

/** The open items of one visit, shown under its row on the clinic day. No clinical detail: the front desk sees it too. */
export function VisitOpenItems({ date, visitId }: { date: string; visitId: string }) {
  const { data } = useOpenItems(date);
  const items = data?.visits.find((v) => v.visitId === visitId)?.items ?? [];
  if (!data) return null;
  if (!items.length) return <Badge tone="done">Nothing open</Badge>;
  return (
    <ul className="mt-1 space-y-0.5 text-sm text-warn" aria-label="Open items">
      {items.map((i, k) => (
        <li key={k} className="flex items-start gap-1.5">
          <span aria-hidden className="mt-2 size-1.5 shrink-0 rounded-full bg-warn" />
          {i.message}
        </li>
      ))}
    </ul>
  );
}

/** Reminders due in the four weeks from the day, and reviews that are overdue with nothing booked. */
export function ClinicDayFollowUps({ date }: { date: string }) {
  const to = addDays(date, 28);
  const reminders = useReminders(date, to);
  const open = useOpenItems(date);
  const [cancelling, setCancelling] = useState<ReminderView | null>(null);
  return (
    <div className="mt-6 grid gap-4 lg:grid-cols-2">
      <Card>
        <CardHeader title="Reminders" action={<span className="text-sm text-ink-faint">{formatDate(date)} – {formatDate(to)}</span>} />
        {reminders.isPending ? (
          <Spinner label="Loading reminders" />
        ) : reminders.error ? (
          <Notice tone="danger" className="m-4">
            {reminders.error.message}
          </Notice>
        ) : !reminders.data.reminders.length ? (
          <p className="px-5 py-4 text-ink-muted">No reminders due in the next four weeks.</p>
        ) : (
          <ol aria-label="Reminders">
            {reminders.data.reminders.map((r) => (
              <li key={r.id} className="flex min-h-14 items-center gap-3 border-b border-line px-5 py-2 last:border-0" data-reminder={r.kind}>
                <BellRing className="size-4 shrink-0 text-ink-faint" aria-hidden />
                <span className="min-w-0 flex-1">
                  <span className="block truncate font-medium">
                    {r.patient ? `${r.patient.firstName} ${r.patient.lastName}` : 'Patient'} <span className="font-mono text-xs text-ink-faint">{r.patient?.code}</span>
                  </span>
                  <span className="text-sm text-ink-muted">
                    {r.kind === 'review' ? 'Review' : 'Maintenance'} · {formatDate(r.dueOn)}
                    {r.patient && !r.patient.hasEmail && r.state === 'scheduled' ? ' · no e-mail address' : ''}
                  </span>
                </span>
                <Badge tone={r.state === 'sent' ? 'done' : r.state === 'cancelled' ? 'neutral' : 'accent'}>{r.state === 'scheduled' ? 'Scheduled' : r.state === 'sent' ? 'Sent' : 'Cancelled'}</Badge>
                {r.state === 'scheduled' && (
                  <Button size="sm" variant="ghost" onClick={() => setCancelling(r)}>
                    Cancel
                  </Button>
                )}
              </li>
            ))}
          </ol>
        )}
      </Card>
      <Card>
        <CardHeader title="Reviews overdue" />
        {open.isPending ? (
          <Spinner label="Loading" />
        ) : !open.data?.overdueReviews.length ? (
          <p className="px-5 py-4 text-ink-muted">No overdue reviews.</p>
        ) : (
          <ol aria-label="Reviews overdue">
            {open.data.overdueReviews.map((o) => (
              <li key={o.treatmentVisitId} className="flex min-h-14 items-center gap-3 border-b border-line px-5 py-2 last:border-0">
                <PhoneCall className="size-4 shrink-0 text-warn" aria-hidden />
                <Link to={`/patients/${o.patient.id}`} className="min-w-0 flex-1 hover:underline">
                  <span className="block truncate font-medium">
                    {o.patient.firstName} {o.patient.lastName} <span className="font-mono text-xs text-ink-faint">{o.patient.code}</span>
                  </span>
                  <span className="text-sm text-ink-muted">
                    Treated {formatDate(o.treatedOn)} · review was due {formatDate(o.dueOn)}
                  </span>
                </Link>
                {o.patient.phone && <span className="font-mono text-sm text-ink-muted">{o.patient.phone}</span>}
              </li>
            ))}
          </ol>
        )}
      </Card>
      <Dialog open={Boolean(cancelling)} onClose={() => setCancelling(null)} title="Cancel reminder">
        {cancelling && <CancelForm reminder={cancelling} onDone={() => setCancelling(null)} />}
      </Dialog>
    </div>
  );
}

function CancelForm({ reminder, onDone }: { reminder: ReminderView; onDone: () => void }) {
  const cancel = useCancelReminder();
  const [reason, setReason] = useState('');
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        cancel.mutate({ id: reminder.id, reason }, { onSuccess: onDone });
      }}
    >
      <p>
        The {reminder.kind} reminder to {reminder.patient?.firstName} {reminder.patient?.lastName} due {formatDate(reminder.dueOn)} will not be sent.
      </p>
      <Field label="Reason" error={cancel.error?.message}>
        {(p) => <Input {...p} value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. review booked at the desk" />}
      </Field>
      <div className="flex justify-end gap-2">
        <Button onClick={onDone}>Keep it</Button>
        <Button type="submit" variant="danger" busy={cancel.isPending} disabled={!reason.trim()}>
          Cancel reminder
        </Button>
      </div>
    </form>
  );
}
