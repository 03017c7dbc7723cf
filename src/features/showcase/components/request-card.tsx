import { useState } from 'react';
import { Download } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { formatDate, formatDateTime } from '../../../lib/format';
import { useClearRequest, useDeclineRequest, useExportRequest, useWithdrawRequest } from '../api/showcase';
import { channelLabel, viewLabel, type ShowcaseRequest } from '../types';

const STATE_TONE = { requested: 'warn', cleared: 'done', declined: 'neutral', withdrawn: 'danger' } as const;
const STATE_LABEL = { requested: 'Awaiting clearance', cleared: 'Cleared', declined: 'Declined', withdrawn: 'Withdrawn' } as const;

/** One showcase request: photos, the consent behind it, its history, and (for admins) the decisions and exports. */
export function RequestCard({ request: r, admin }: { request: ShowcaseRequest; admin: boolean }) {
  const clear = useClearRequest();
  const decline = useDeclineRequest();
  const withdraw = useWithdrawRequest();
  const exp = useExportRequest();
  const [note, setNote] = useState('');
  const error = clear.error ?? decline.error ?? withdraw.error ?? exp.error;

  return (
    <Card className="overflow-hidden" aria-label={`Showcase request ${r.id.slice(0, 8)}`}>
      <div className="flex flex-wrap items-start gap-4 p-4">
        <div className="flex gap-1.5 rounded-lg bg-photo-surround p-1.5">
          {r.photos.map((p) => (
            <img key={p.id} src={p.thumbUrl} alt={`${viewLabel(r.viewKey)} photo`} className="h-24 w-20 rounded object-cover" loading="lazy" />
          ))}
        </div>
        <div className="min-w-0 flex-1 space-y-1.5">
          <div className="flex flex-wrap items-center gap-2">
            <Badge tone={STATE_TONE[r.state]}>{STATE_LABEL[r.state]}</Badge>
            <span className="font-medium">{viewLabel(r.viewKey)}</span>
            {r.patient && admin && (
              <span className="text-ink-muted">
                · {r.patient.firstName} {r.patient.lastName} <span className="font-mono text-xs">{r.patient.code}</span>
              </span>
            )}
          </div>
          <p className="text-sm text-ink-muted">
            For {r.channels.map(channelLabel).join(', ')} · {r.crop === 'lips-only' ? 'lips-only crop' : 'face may be shown'}
          </p>
          <p className="text-sm text-ink-faint">
            Requested by {r.requestedByName} on {formatDateTime(r.requestedAt)}
            {r.requestNote && ` — “${r.requestNote}”`}
          </p>
          {r.consent && (
            <p className="text-sm text-ink-faint">
              Showcase consent v{r.consent.templateVersion}, signed {formatDate(r.consent.signedAt)}: {r.consent.channels.map(channelLabel).join(', ') || 'no channels'}
              {r.consent.withdrawnAt && <span className="font-medium text-danger"> — withdrawn {formatDate(r.consent.withdrawnAt)}</span>}
            </p>
          )}
          {r.decidedAt && (
            <p className="text-sm text-ink-faint">
              {r.state === 'declined' ? 'Declined' : 'Cleared'} by {r.decidedByName} on {formatDateTime(r.decidedAt)}
              {r.decisionNote && ` — “${r.decisionNote}”`}
            </p>
          )}
          {r.withdrawnAt && (
            <p className="text-sm text-danger">
              Withdrawn {formatDateTime(r.withdrawnAt)}: {r.withdrawnReason}
            </p>
          )}
        </div>
      </div>
      {error && (
        <div className="px-4 pb-3">
          <Notice tone="danger">{error.message}</Notice>
        </div>
      )}
      {r.exports.length > 0 && (
        <div className="border-t border-line px-4 py-3">
          <p className="mb-2 text-sm font-medium">Exports</p>
          <ul className="space-y-1 text-sm">
            {r.exports.map((e) => (
              <li key={e.id} className="flex flex-wrap items-center gap-2">
                <span className="text-ink-muted">
                  {formatDateTime(e.exportedAt)} · {channelLabel(e.channel)}
                </span>
                {r.state === 'cleared' &&
                  admin &&
                  e.files.map((f) => (
                    <a key={f.name} href={f.url} className="inline-flex min-h-9 items-center gap-1 rounded-md px-2 text-accent-strong hover:bg-accent-soft" download>
                      <Download className="size-3.5" /> {f.name}
                    </a>
                  ))}
              </li>
            ))}
          </ul>
        </div>
      )}
      {admin && (r.state === 'requested' || r.state === 'cleared') && (
        <div className="space-y-3 border-t border-line bg-paper-sunk/40 px-4 py-3">
          <Field label={r.state === 'requested' ? 'Decision note' : 'Reason to withdraw'}>{(p) => <Textarea {...p} rows={2} value={note} onChange={(e) => setNote(e.target.value)} />}</Field>
          <div className="flex flex-wrap gap-2">
            {r.state === 'requested' && (
              <>
                <Button variant="done" busy={clear.isPending} onClick={() => clear.mutate({ id: r.id, note: note || undefined })}>
                  Clear for showcase
                </Button>
                <Button busy={decline.isPending} onClick={() => decline.mutate({ id: r.id, note })}>
                  Decline
                </Button>
              </>
            )}
            {r.state === 'cleared' &&
              r.channels.map((c) => (
                <Button key={c} variant="primary" busy={exp.isPending && exp.variables?.channel === c} onClick={() => exp.mutate({ id: r.id, channel: c })}>
                  Export for {channelLabel(c)}
                </Button>
              ))}
            <Button variant="danger" busy={withdraw.isPending} onClick={() => withdraw.mutate({ id: r.id, reason: note })}>
              Withdraw
            </Button>
          </div>
        </div>
      )}
    </Card>
  );
}
