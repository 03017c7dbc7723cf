import { Link, useNavigate } from 'react-router-dom';
import { ShieldAlert } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import { formatDateTime } from '../../../lib/format';
import { usePatientEpisodes, useProtocol, useStartEpisode } from '../api/complications';
import { OUTCOME_LABELS, SIGN_LABELS } from '../types';

/** The clinic's own protocol pointer (clinic settings), shown wherever a complication may be handled. */
export function ProtocolPointer() {
  const { data } = useProtocol();
  return (
    <p className="flex gap-2 text-sm text-ink" data-testid="protocol-pointer">
      <ShieldAlert className="mt-0.5 size-4 shrink-0 text-warn" aria-hidden />
      <span>{data ? data : 'Follow the clinic’s written complication protocol.'} This record keeps what happened and what was done; it gives no doses.</span>
    </p>
  );
}

/** Complication episodes of a treatment visit, and the one-tap start of a new one. */
export function VisitComplications({ visitId, patientId }: { visitId: string; patientId: string }) {
  const navigate = useNavigate();
  const episodes = usePatientEpisodes(patientId);
  const start = useStartEpisode(visitId, patientId);
  const mine = (episodes.data ?? []).filter((e) => e.visitId === visitId);
  return (
    <Card>
      <CardHeader
        title="Complications"
        action={
          <Button variant="danger" busy={start.isPending} onClick={() => start.mutate({}, { onSuccess: (e) => navigate(`/complications/${e.id}`) })}>
            Start a complication record
          </Button>
        }
      />
      <div className="space-y-3 p-5">
        <ProtocolPointer />
        {start.error && <Notice tone="danger">{start.error.message}</Notice>}
        {mine.length > 0 && (
          <ul className="divide-y divide-line rounded-lg border border-line">
            {mine.map((e) => (
              <li key={e.id}>
                <Link to={`/complications/${e.id}`} className="flex min-h-11 flex-wrap items-center justify-between gap-2 px-4 py-2 hover:bg-paper-sunk">
                  <span>
                    Onset {formatDateTime(e.onsetAt)}
                    {e.signs.length > 0 && <span className="ml-2 text-sm text-ink-muted">{e.signs.map((s) => SIGN_LABELS[s as keyof typeof SIGN_LABELS] ?? s).join(', ')}</span>}
                  </span>
                  <Badge tone={e.outcome === 'resolved' ? 'done' : 'warn'}>{e.outcome ? OUTCOME_LABELS[e.outcome as keyof typeof OUTCOME_LABELS] : 'Open'}</Badge>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </div>
    </Card>
  );
}
