import { useState } from 'react';
import { Paperclip, RotateCw } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { formatDateTime } from '../../../lib/format';
import { useMail, useOutbox, useRetryMail } from '../api/outbox';
import type { MailState, OutboxMail } from '../types';

const TONE: Record<MailState, 'done' | 'warn' | 'danger' | 'neutral'> = { sent: 'done', pending: 'warn', sending: 'neutral', failed: 'danger' };

/** The e-mails Twinframe queued and sent (signed copies, withdrawal confirmations, reminders). */
export function OutboxPage() {
  const [state, setState] = useState<MailState | ''>('');
  const [page, setPage] = useState(1);
  const [open, setOpen] = useState<string | null>(null);
  const outbox = useOutbox({ state: state || undefined, page });
  return (
    <>
      <PageHeader
        title="Outbox"
        subtitle="E-mails to patients. Failed sends are retried with growing pauses; nothing is lost when the mail server is down."
        actions={
          <Select aria-label="Show" value={state} onChange={(e) => { setState(e.target.value as MailState | ''); setPage(1); }} className="w-44">
            <option value="">All e-mails</option>
            <option value="pending">Pending</option>
            <option value="sent">Sent</option>
            <option value="failed">Failed</option>
          </Select>
        }
      />
      {outbox.isPending ? (
        <Spinner label="Loading outbox" />
      ) : outbox.error ? (
        <Notice tone="danger">{outbox.error.message}</Notice>
      ) : outbox.data.items.length === 0 ? (
        <EmptyState title="No e-mails" />
      ) : (
        <div className="space-y-2">
          {outbox.data.items.map((m) => (
            <MailRow key={m.id} m={m} open={open === m.id} onToggle={() => setOpen(open === m.id ? null : m.id)} />
          ))}
          <div className="flex items-center justify-between pt-2 text-sm text-ink-muted">
            <span>{outbox.data.total} e-mails</span>
            <div className="flex gap-2">
              <Button size="sm" disabled={page <= 1} onClick={() => setPage(page - 1)}>Previous</Button>
              <Button size="sm" disabled={page * outbox.data.pageSize >= outbox.data.total} onClick={() => setPage(page + 1)}>Next</Button>
            </div>
          </div>
        </div>
      )}
    </>
  );
}

function MailRow({ m, open, onToggle }: { m: OutboxMail; open: boolean; onToggle: () => void }) {
  const detail = useMail(open ? m.id : null);
  const retry = useRetryMail();
  return (
    <Card className="px-4 py-3">
      <button type="button" onClick={onToggle} className="flex w-full flex-wrap items-center gap-3 text-left" aria-expanded={open}>
        <Badge tone={TONE[m.state]}>{m.state}</Badge>
        <span className="min-w-0 flex-1">
          <span className="block truncate font-medium">{m.subject}</span>
          <span className="block text-sm text-ink-muted">
            to {m.to} · {m.sentAt ? `sent ${formatDateTime(m.sentAt)}` : `queued ${formatDateTime(m.createdAt)}`}
            {m.attempts > 1 || m.state !== 'sent' ? ` · ${m.attempts} attempt${m.attempts === 1 ? '' : 's'}` : ''}
          </span>
        </span>
        {m.attachments.length > 0 && (
          <span className="flex items-center gap-1 text-sm text-ink-muted">
            <Paperclip className="size-4" aria-hidden /> {m.attachments.map((a) => a.filename).join(', ')}
          </span>
        )}
      </button>
      {m.lastError && m.state !== 'sent' && <p className="mt-2 text-sm text-danger">Last error: {m.lastError}</p>}
      {m.state === 'failed' && (
        <Button size="sm" className="mt-2" busy={retry.isPending} onClick={() => retry.mutate(m.id)}>
          <RotateCw className="size-4" aria-hidden /> Send again
        </Button>
      )}
      {open && (detail.data ? <pre className="mt-3 whitespace-pre-wrap rounded-lg bg-paper-sunk p-3 font-sans text-sm">{detail.data.text}</pre> : <Spinner label="Opening" />)}
    </Card>
  );
}
