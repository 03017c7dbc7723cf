import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Smartphone, Tablet } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatTime } from '../../../lib/format';
import { useTemplates } from '../api/consent-templates';
import { useCancelHandover, useHandoverStatus, useStartHandover } from '../api/handovers';
import { KIND_LABEL, type ConsentKind, type StartedHandover } from '../types';

const KIND_ORDER: ConsentKind[] = ['screening', 'treatment', 'photography', 'showcase'];

/** Staff choose forms for one patient and hand this tablet over, or give the patient a code for another device. */
export function StartHandoverDialog({ open, onClose, patient, visitId }: { open: boolean; onClose: () => void; patient: { id: string; firstName: string; lastName: string }; visitId?: string }) {
  const navigate = useNavigate();
  const templates = useTemplates({ status: 'published' });
  const start = useStartHandover();
  const [chosen, setChosen] = useState<string[]>([]);
  const [mode, setMode] = useState<'this-device' | 'second-device'>('this-device');
  const [started, setStarted] = useState<StartedHandover | null>(null);

  const forms = [...(templates.data ?? [])].sort((a, b) => KIND_ORDER.indexOf(a.kind) - KIND_ORDER.indexOf(b.kind));
  const ordered = forms.filter((f) => chosen.includes(f.id)).map((f) => f.id);
  const close = () => {
    setStarted(null);
    setChosen([]);
    start.reset();
    onClose();
  };

  return (
    <Dialog open={open} onClose={close} title="Hand-over for signing">
      {started ? (
        <SecondDeviceCode started={started} onDone={close} />
      ) : (
        <div className="space-y-5">
          <p className="text-ink-muted">
            Forms for <strong className="text-ink">{patient.firstName} {patient.lastName}</strong>. The patient sees only these forms, one at a time.
          </p>
          {templates.isPending ? (
            <Spinner label="Loading forms" />
          ) : (
            <fieldset className="space-y-2">
              <legend className="mb-2 text-sm font-medium text-ink-muted">Forms to sign</legend>
              {forms.map((f) => (
                <label key={f.id} className={cn('flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border px-3', chosen.includes(f.id) ? 'border-ink bg-paper-sunk/50' : 'border-line')}>
                  <input type="checkbox" className="size-5" checked={chosen.includes(f.id)} onChange={(e) => setChosen((c) => (e.target.checked ? [...c, f.id] : c.filter((x) => x !== f.id)))} />
                  <span className="flex-1">
                    <span className="block font-medium">{f.title}</span>
                    <span className="block text-xs text-ink-faint">
                      {KIND_LABEL[f.kind]} · version {f.version}
                      {f.kind === 'showcase' ? ' · optional for the patient' : ''}
                    </span>
                  </span>
                </label>
              ))}
              {forms.length === 0 && <Notice tone="warn">No published forms yet. An admin publishes them under Admin → Consent forms.</Notice>}
            </fieldset>
          )}
          <fieldset>
            <legend className="mb-2 text-sm font-medium text-ink-muted">Where the patient signs</legend>
            <div className="grid gap-2 sm:grid-cols-2">
              {(
                [
                  ['this-device', Tablet, 'This tablet', 'You are signed out here; sign in again to take it back.'],
                  ['second-device', Smartphone, 'Another device', 'The patient opens the forms with a one-time code.'],
                ] as const
              ).map(([value, Icon, label, hint]) => (
                <label key={value} className={cn('flex cursor-pointer gap-3 rounded-lg border p-3', mode === value ? 'border-ink bg-paper-sunk/50' : 'border-line')}>
                  <input type="radio" name="handover-mode" className="mt-1 size-4" checked={mode === value} onChange={() => setMode(value)} />
                  <span>
                    <span className="flex items-center gap-2 font-medium">
                      <Icon className="size-4" aria-hidden /> {label}
                    </span>
                    <span className="block text-sm text-ink-muted">{hint}</span>
                  </span>
                </label>
              ))}
            </div>
          </fieldset>
          {start.error && <Notice tone="danger">{start.error instanceof ApiError ? start.error.message : 'Could not start the hand-over.'}</Notice>}
          <div className="flex justify-end gap-2">
            <Button onClick={close}>Cancel</Button>
            <Button
              variant="primary"
              disabled={ordered.length === 0}
              busy={start.isPending}
              onClick={() =>
                start.mutate(
                  { patientId: patient.id, templateIds: ordered, mode, visitId },
                  {
                    onSuccess: (h) => {
                      if (h.mode === 'this-device') navigate('/handover', { replace: true });
                      else setStarted(h);
                    },
                  },
                )
              }
            >
              {mode === 'this-device' ? 'Hand this tablet over' : 'Create code'}
            </Button>
          </div>
        </div>
      )}
    </Dialog>
  );
}

function SecondDeviceCode({ started, onDone }: { started: StartedHandover; onDone: () => void }) {
  const status = useHandoverStatus(started.id);
  const cancel = useCancelHandover();
  const state = status.data?.state ?? 'waiting';
  const link = `${window.location.origin}${started.path}`;
  return (
    <div className="space-y-5 text-center">
      <p className="text-ink-muted">On the patient's device, open the link below or go to {window.location.origin}/handover and type:</p>
      <p className="font-mono text-5xl font-semibold tracking-[0.2em]" aria-label="Hand-over code">
        {started.code}
      </p>
      <p className="break-all text-xs text-ink-faint">{link}</p>
      <p className="text-sm text-ink-muted">Works once, until {formatTime(started.expiresAt)}.</p>
      <div className="flex flex-wrap justify-center gap-2">
        {status.data?.forms.map((f) => (
          <Badge key={f.templateId} tone={f.state === 'signed' ? 'done' : f.state === 'declined' ? 'neutral' : 'warn'}>
            {f.title}: {f.state === 'to-do' ? 'to sign' : f.state}
          </Badge>
        ))}
      </div>
      <Notice tone={state === 'completed' ? 'done' : state === 'expired' || state === 'cancelled' ? 'warn' : 'info'}>
        {state === 'waiting' && 'Waiting for the patient to open the forms…'}
        {state === 'in-progress' && 'The patient is signing.'}
        {state === 'completed' && 'All forms are done.'}
        {state === 'expired' && 'The code has expired.'}
        {state === 'cancelled' && 'The hand-over was cancelled.'}
      </Notice>
      <div className="flex justify-center gap-2">
        {(state === 'waiting' || state === 'in-progress') && (
          <Button variant="danger" busy={cancel.isPending} onClick={() => cancel.mutate(started.id)}>
            Cancel hand-over
          </Button>
        )}
        <Button variant="primary" onClick={onDone}>
          Close
        </Button>
      </div>
    </div>
  );
}
