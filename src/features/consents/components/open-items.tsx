import { useState } from 'react';
import { AlertTriangle, CheckCircle2, FileWarning } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useAcknowledgeFlags, useOpenItems } from '../api/consents';
import type { OpenItem } from '../types';

/** What must be done before the visit can go ahead: consents and the review of flagged screening answers. */
export function VisitOpenItems({ visitId, canReview }: { visitId: string; canReview: boolean }) {
  const open = useOpenItems(visitId);
  const [reviewing, setReviewing] = useState<OpenItem | null>(null);
  return (
    <Card>
      <CardHeader title="Open items" />
      <div className="px-5 py-4">
        {open.isPending ? (
          <Spinner label="Checking consents" />
        ) : open.error ? (
          <Notice tone="danger">{open.error.message}</Notice>
        ) : open.data.ready ? (
          <p className="flex items-center gap-2 text-done">
            <CheckCircle2 className="size-5" aria-hidden /> Consents and screening are complete for this visit.
          </p>
        ) : (
          <ul className="space-y-2">
            {open.data.items.map((item) => (
              <li key={`${item.type}-${item.kind}`} className="flex flex-wrap items-center gap-3 rounded-lg border border-warn/30 bg-warn-soft/50 px-3 py-2">
                {item.type === 'screening-flags' ? <AlertTriangle className="size-5 text-warn" aria-hidden /> : <FileWarning className="size-5 text-warn" aria-hidden />}
                <span className="flex-1">{item.message}</span>
                {item.type === 'screening-flags' && canReview && (
                  <Button size="sm" onClick={() => setReviewing(item)}>
                    Review
                  </Button>
                )}
              </li>
            ))}
          </ul>
        )}
        <p className="mt-3 text-xs text-ink-faint">Screening flags need a clinician's judgement; Twinframe only records the answers and your review.</p>
      </div>
      {reviewing && <ReviewDialog item={reviewing} onClose={() => setReviewing(null)} />}
    </Card>
  );
}

function ReviewDialog({ item, onClose }: { item: OpenItem; onClose: () => void }) {
  const ack = useAcknowledgeFlags();
  const [note, setNote] = useState('');
  const error = ack.error instanceof ApiError ? ack.error.fieldErrors().note ?? ack.error.message : ack.error?.message;
  return (
    <Dialog open onClose={onClose} title="Review flagged screening answers">
      <form
        className="space-y-4"
        onSubmit={(e) => {
          e.preventDefault();
          ack.mutate({ id: item.consentId!, note }, { onSuccess: onClose });
        }}
      >
        <p className="text-ink-muted">{item.message} Open the patient's health questionnaire to see the answers, discuss them with the patient, and record your decision.</p>
        <Field label="Your review" error={error}>
          {(p) => <Textarea {...p} rows={4} value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" busy={ack.isPending}>
            Record review
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
