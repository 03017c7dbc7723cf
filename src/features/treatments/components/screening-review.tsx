import { useState } from 'react';
import { AlertTriangle, CheckCircle2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { formatDateTime } from '../../../lib/format';
import { useAcknowledgeFlags, useScreening } from '../api/treatments';

/** The latest screening questionnaire with its flagged answers; each flag needs the practitioner's note. */
export function ScreeningReviewCard({ visitId }: { visitId: string }) {
  const { data, isPending, error } = useScreening(visitId);
  const ack = useAcknowledgeFlags(visitId);
  const [notes, setNotes] = useState<Record<string, string>>({});
  const [showAll, setShowAll] = useState(false);
  if (isPending) return <Spinner label="Loading the screening answers" />;
  if (error) return <Notice tone="danger">{error.message}</Notice>;
  const s = data.screening;
  const open = s?.flags.filter((f) => !f.acknowledged) ?? [];

  return (
    <Card>
      <CardHeader
        title="Screening review"
        action={!s ? <Badge tone="warn">No questionnaire</Badge> : open.length ? <Badge tone="warn">{open.length} to review</Badge> : <Badge tone="done">Reviewed</Badge>}
      />
      <div className="space-y-4 p-5">
        <Notice>Flagged answers support, and never replace, your clinical judgement. Discuss each one with the patient before deciding to treat.</Notice>
        {!s ? (
          <p className="text-ink-muted">No screening questionnaire is on file. Ask the patient to complete one at hand-over before treatment.</p>
        ) : (
          <>
            <p className="text-sm text-ink-muted">
              {s.title} (version {s.templateVersion}), signed by {s.signerName} on {formatDateTime(s.signedAt)}.
            </p>
            {s.flags.length === 0 && <p>No answers were flagged.</p>}
            <ul className="space-y-3">
              {s.flags.map((f) => (
                <li key={f.questionId} className={f.acknowledged ? 'rounded-lg border border-line p-3' : 'rounded-lg border border-warn/40 bg-warn-soft p-3'}>
                  <p className="flex items-start gap-2 font-medium">
                    {f.acknowledged ? <CheckCircle2 className="mt-0.5 size-5 shrink-0 text-done" aria-hidden /> : <AlertTriangle className="mt-0.5 size-5 shrink-0 text-warn" aria-hidden />}
                    <span>
                      {f.label} <span className="font-semibold">— {f.answer}</span>
                    </span>
                  </p>
                  {f.acknowledged ? (
                    <p className="mt-1 pl-7 text-sm text-ink-muted">
                      “{f.note}” — {f.acknowledgedByName ?? 'practitioner'}, {f.acknowledgedAt ? formatDateTime(f.acknowledgedAt) : ''}
                    </p>
                  ) : (
                    <Field label="Your note" className="mt-2 pl-7" error={ack.error && !notes[f.questionId]?.trim() ? 'Write a note for this answer.' : undefined}>
                      {(p) => <Textarea {...p} rows={2} value={notes[f.questionId] ?? ''} onChange={(e) => setNotes({ ...notes, [f.questionId]: e.target.value })} />}
                    </Field>
                  )}
                </li>
              ))}
            </ul>
            {open.length > 0 && (
              <div className="flex flex-wrap items-center justify-end gap-3">
                {ack.error && <span className="text-sm text-danger">{ack.error.message}</span>}
                <Button
                  variant="primary"
                  busy={ack.isPending}
                  disabled={open.some((f) => (notes[f.questionId] ?? '').trim().length < 3)}
                  onClick={() => ack.mutate({ consentId: s.consentId, notes: open.map((f) => ({ questionId: f.questionId, note: notes[f.questionId].trim() })) })}
                >
                  Acknowledge {open.length === 1 ? 'flag' : `${open.length} flags`}
                </Button>
              </div>
            )}
            <Button variant="ghost" size="sm" aria-expanded={showAll} onClick={() => setShowAll(!showAll)}>
              {showAll ? 'Hide all answers' : 'Show all answers'}
            </Button>
            {showAll && (
              <dl className="divide-y divide-line text-[15px]">
                {s.answers.map((a) => (
                  <div key={a.questionId} className="grid gap-1 py-2 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
                    <dt className="text-ink-muted">{a.label}</dt>
                    <dd className={a.flagged ? 'font-semibold text-warn' : ''}>{a.answer || '—'}</dd>
                  </div>
                ))}
              </dl>
            )}
          </>
        )}
      </div>
    </Card>
  );
}
