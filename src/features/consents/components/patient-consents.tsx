import { useState } from 'react';
import { AlertTriangle, FileText, Mail, PenLine, ShieldAlert, ShieldCheck, Undo2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button, buttonVariants } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDate, formatDateTime } from '../../../lib/format';
import { useTemplate } from '../api/consent-templates';
import { consentPdfUrl, usePatientConsents, useVerification, useWithdrawConsent } from '../api/consents';
import { CHANNEL_LABEL, KIND_LABEL, type Consent, type ConsentKind } from '../types';
import { StartHandoverDialog } from './start-handover-dialog';

const KIND_ORDER: ConsentKind[] = ['treatment', 'screening', 'photography', 'showcase'];
const WITHDRAWABLE: ConsentKind[] = ['photography', 'showcase'];

/** The patient's consents tab: what is signed, which version, its state, the PDF, verification and withdrawal. */
export function PatientConsents({ patient }: { patient: { id: string; firstName: string; lastName: string; email: string | null } }) {
  const consents = usePatientConsents(patient.id);
  const [handover, setHandover] = useState(false);
  const [withdrawing, setWithdrawing] = useState<Consent | null>(null);

  return (
    <section aria-label="Consents" className="space-y-5">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 className="text-2xl font-semibold">Consents</h2>
        <Button variant="primary" onClick={() => setHandover(true)}>
          <PenLine className="size-4" aria-hidden /> Hand over for signing
        </Button>
      </div>
      {!patient.email && <Notice tone="warn">No e-mail address on file: signed copies cannot be e-mailed to the patient.</Notice>}
      {consents.isPending ? (
        <Spinner label="Loading consents" />
      ) : consents.error ? (
        <Notice tone="danger">{consents.error.message}</Notice>
      ) : consents.data.length === 0 ? (
        <EmptyState title="Nothing signed yet">Hand the tablet over to let the patient read and sign the clinic's forms.</EmptyState>
      ) : (
        KIND_ORDER.filter((k) => consents.data.some((c) => c.kind === k)).map((kind) => (
          <div key={kind} className="space-y-2">
            <h3 className="text-sm font-semibold uppercase tracking-wide text-ink-muted">{KIND_LABEL[kind]}</h3>
            {consents.data
              .filter((c) => c.kind === kind)
              .map((c) => (
                <ConsentRow key={c.id} c={c} onWithdraw={() => setWithdrawing(c)} />
              ))}
          </div>
        ))
      )}
      <StartHandoverDialog open={handover} onClose={() => setHandover(false)} patient={patient} />
      {withdrawing && <WithdrawDialog consent={withdrawing} patientId={patient.id} onClose={() => setWithdrawing(null)} />}
    </section>
  );
}

const STATE_BADGE = { current: ['done', 'Current'], superseded: ['neutral', 'Superseded'], withdrawn: ['danger', 'Withdrawn'] } as const;

function ConsentRow({ c, onWithdraw }: { c: Consent; onWithdraw: () => void }) {
  const [verifying, setVerifying] = useState(false);
  const verification = useVerification(c.id, verifying);
  const [tone, label] = STATE_BADGE[c.state];
  return (
    <Card className={cn('px-5 py-4', c.state !== 'current' && 'bg-paper-raised/60')} data-testid={`consent-${c.id}`}>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <p className="font-semibold">{c.title}</p>
          <p className="text-sm text-ink-muted">
            Version {c.templateVersion} · signed {formatDateTime(c.signedAt)} by {c.signerName}
          </p>
        </div>
        <Badge tone={tone}>{label}</Badge>
      </div>
      <div className="mt-3 flex flex-wrap gap-x-5 gap-y-1 text-sm text-ink-muted">
        <EmailState c={c} />
        {c.kind === 'showcase' && (
          <span>
            {c.channels.map((ch) => CHANNEL_LABEL[ch]).join(', ')} · {c.crop === 'face' ? 'whole face' : 'lips-only crop'}
          </span>
        )}
        {c.flaggedCount > 0 && (
          <span className={cn('flex items-center gap-1', c.flagsAcknowledgedAt ? 'text-done' : 'text-warn')}>
            <AlertTriangle className="size-4" aria-hidden />
            {c.flaggedCount} flagged {c.flaggedCount === 1 ? 'answer' : 'answers'}
            {c.flagsAcknowledgedAt ? `, reviewed ${formatDate(c.flagsAcknowledgedAt)}` : ', not yet reviewed'}
          </span>
        )}
      </div>
      {!c.nameMatchesPatient && (
        <Notice tone="warn" className="mt-3">
          The typed name “{c.signerName}” differs from the patient record. Check it with the patient.
        </Notice>
      )}
      {c.withdrawal && (
        <Notice tone="danger" className="mt-3" title={`Withdrawn on ${c.withdrawal.date ? formatDate(c.withdrawal.date) : formatDate(c.withdrawal.at)}`}>
          {c.withdrawal.reason} · confirmation e-mail {c.withdrawal.email ? (c.withdrawal.email.state === 'sent' ? 'sent' : 'pending') : 'not sent (no address)'}
        </Notice>
      )}
      {c.answers && c.kind === 'screening' && c.flaggedQuestionIds && c.flaggedQuestionIds.length > 0 && <FlaggedAnswers c={c} />}
      <div className="mt-4 flex flex-wrap items-center gap-2">
        {c.canOpenPdf ? (
          <a href={consentPdfUrl(c.id)} target="_blank" rel="noopener" className={buttonVariants({ size: 'sm' })}>
            <FileText className="size-4" aria-hidden /> Open PDF
          </a>
        ) : (
          <span className="text-sm text-ink-faint">PDF for clinicians only (health answers)</span>
        )}
        <Button size="sm" onClick={() => (verifying ? verification.refetch() : setVerifying(true))} busy={verification.isFetching}>
          <ShieldCheck className="size-4" aria-hidden /> Verify
        </Button>
        {WITHDRAWABLE.includes(c.kind) && !c.withdrawal && (
          <Button size="sm" variant="danger" onClick={onWithdraw}>
            <Undo2 className="size-4" aria-hidden /> Withdraw
          </Button>
        )}
        {verification.data && (
          <span role="status" className={cn('flex items-center gap-1 text-sm font-medium', verification.data.status === 'valid' ? 'text-done' : 'text-danger')}>
            {verification.data.status === 'valid' ? <ShieldCheck className="size-4" aria-hidden /> : <ShieldAlert className="size-4" aria-hidden />}
            {verification.data.status === 'valid' ? 'Verified: unchanged since signing' : 'Altered: the stored file or its record no longer matches what was signed'}
          </span>
        )}
        {verification.error && <span className="text-sm text-danger">{verification.error.message}</span>}
      </div>
      <p className="mt-2 break-all font-mono text-[11px] text-ink-faint" title="The SHA-256 of the exact PDF stored and e-mailed; the patient's e-mail states the same value.">
        SHA-256 of the signed PDF {c.pdfSha256}
      </p>
    </Card>
  );
}

function FlaggedAnswers({ c }: { c: Consent }) {
  const template = useTemplate(c.templateId);
  const label = (id: string) => template.data?.questions.find((q) => q.id === id)?.label ?? id;
  return (
    <ul className="mt-3 space-y-1 rounded-lg bg-warn-soft/60 px-4 py-2 text-sm">
      {c.flaggedQuestionIds!.map((q) => (
        <li key={q}>
          {label(q)} <strong>{c.answers?.[q] === 'yes' ? 'Yes' : c.answers?.[q] === 'no' ? 'No' : c.answers?.[q]}</strong>
        </li>
      ))}
    </ul>
  );
}

function EmailState({ c }: { c: Consent }) {
  if (!c.email) return <span className="flex items-center gap-1"><Mail className="size-4" aria-hidden /> Not e-mailed (no address)</span>;
  if (c.email.state === 'sent' && c.email.sentAt) return <span className="flex items-center gap-1"><Mail className="size-4" aria-hidden /> E-mailed {formatDateTime(c.email.sentAt)}</span>;
  if (c.email.state === 'failed') return <span className="flex items-center gap-1 text-danger"><Mail className="size-4" aria-hidden /> E-mail failed</span>;
  return (
    <span className="flex items-center gap-1 text-warn">
      <Mail className="size-4" aria-hidden /> E-mail pending{c.email.attempts > 0 ? ` (tried ${c.email.attempts}×, retrying)` : ''}
    </span>
  );
}

/** One action: the reason and the day the patient asked, then it is recorded and confirmed by e-mail. */
function WithdrawDialog({ consent, patientId, onClose }: { consent: Consent; patientId: string; onClose: () => void }) {
  const withdraw = useWithdrawConsent(patientId);
  const [reason, setReason] = useState('');
  const [date, setDate] = useState(new Date().toLocaleDateString('en-CA'));
  const errors = withdraw.error instanceof ApiError ? withdraw.error.fieldErrors() : {};
  return (
    <Dialog open onClose={onClose} title={`Withdraw ${KIND_LABEL[consent.kind].toLowerCase()}`}>
      <form
        className="space-y-4"
        onSubmit={(e) => {
          e.preventDefault();
          withdraw.mutate({ id: consent.id, reason: reason.trim() || 'No reason given.', date }, { onSuccess: onClose });
        }}
      >
        <p className="text-ink-muted">
          Record the patient's withdrawal of “{consent.title}” (version {consent.templateVersion}). The signed record stays as it is; the withdrawal is added to it and the patient is sent a confirmation.
          {consent.kind === 'showcase' && ' Showcase uses of their photos stop.'}
        </p>
        <Field label="Reason the patient gave" hint="Leave empty if they gave none." error={errors.reason}>
          {(p) => <Textarea {...p} rows={3} value={reason} onChange={(e) => setReason(e.target.value)} maxLength={1000} />}
        </Field>
        <Field label="Date the patient asked" error={errors.date}>
          {(p) => <Input {...p} type="date" value={date} max={new Date().toLocaleDateString('en-CA')} onChange={(e) => setDate(e.target.value)} />}
        </Field>
        {withdraw.error && !Object.keys(errors).length && <Notice tone="danger">{withdraw.error.message}</Notice>}
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" busy={withdraw.isPending}>
            Record withdrawal
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
