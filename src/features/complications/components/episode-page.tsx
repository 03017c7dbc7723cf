import { useEffect, useState } from 'react';
import { Link } from 'react-router-dom';
import { Camera, FileDown, ScanLine } from 'lucide-react';
import { LabelScanner } from '../../../components/label-scanner';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Input, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDateTime, toLocalInput } from '../../../lib/format';
import { episodePdfUrl, useAddAction, useAddFollowUp, useEnzymes, useEpisode, useUpdateEpisode } from '../api/complications';
import { ACTION_KINDS, ACTION_LABELS, COMPLICATION_SIGNS, OUTCOME_LABELS, OUTCOMES, SIGN_LABELS, type ActionInput, type EpisodeView } from '../types';
import { ProtocolPointer } from './visit-complications';

const fromLocal = (v: string) => new Date(v).toISOString();
const fmt = (n: number) => String(Math.round(n * 100) / 100);

/** A complication episode: onset and signs, what was done and when, follow-ups with photos, outcome, PDF. */
export function EpisodePage({ id }: { id: string }) {
  const { data: e, isPending, error } = useEpisode(id);
  if (isPending) return <Spinner label="Loading the complication record" />;
  if (error || !e) return <Notice tone="danger">{error?.message ?? 'Not found.'}</Notice>;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-3xl font-semibold">Complication record</h1>
          <p className="mt-1 text-ink-muted">
            Onset {formatDateTime(e.onsetAt)} · opened {formatDateTime(e.startedAt)}
            {e.startedBy ? ` by ${e.startedBy}` : ''} ·{' '}
            <Link to={`/visits/${e.visitId}`} className="underline underline-offset-2">
              treatment visit
            </Link>
          </p>
        </div>
        <a href={episodePdfUrl(e.id)} className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-4 text-[15px] font-medium hover:bg-paper-sunk">
          <FileDown className="size-4" aria-hidden /> PDF summary
        </a>
      </div>
      <aside className="rounded-lg border border-warn/30 bg-warn-soft px-4 py-3" aria-label="Clinic protocol">
        <ProtocolPointer />
      </aside>
      <SignsCard e={e} />
      <ActionsCard e={e} />
      <FollowUpsCard e={e} />
      <OutcomeCard e={e} />
    </div>
  );
}

function Chip({ on, onClick, children }: { on: boolean; onClick: () => void; children: React.ReactNode }) {
  return (
    <button
      type="button"
      aria-pressed={on}
      onClick={onClick}
      className={cn('min-h-11 rounded-full border px-4 text-sm', on ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk')}
    >
      {children}
    </button>
  );
}

function SignsCard({ e }: { e: EpisodeView }) {
  const update = useUpdateEpisode(e.id);
  const [onset, setOnset] = useState(toLocalInput(e.onsetAt));
  const [signs, setSigns] = useState<string[]>(e.signs);
  const [notes, setNotes] = useState(e.signsNotes);
  useEffect(() => {
    setOnset(toLocalInput(e.onsetAt));
    setSigns(e.signs);
    setNotes(e.signsNotes);
  }, [e.onsetAt, e.signs, e.signsNotes]);
  const dirty = onset !== toLocalInput(e.onsetAt) || signs.join() !== e.signs.join() || notes !== e.signsNotes;
  return (
    <Card>
      <CardHeader title="Onset and signs" />
      <div className="space-y-4 p-5">
        <Field label="Onset" hint="When the first sign was noticed." className="max-w-xs">
          {(p) => <Input {...p} type="datetime-local" value={onset} onChange={(x) => setOnset(x.target.value)} />}
        </Field>
        <fieldset>
          <legend className="mb-1.5 text-sm font-medium text-ink-muted">Signs seen</legend>
          <div className="flex flex-wrap gap-2">
            {COMPLICATION_SIGNS.map((s) => (
              <Chip key={s} on={signs.includes(s)} onClick={() => setSigns(signs.includes(s) ? signs.filter((x) => x !== s) : [...signs, s])}>
                {SIGN_LABELS[s]}
              </Chip>
            ))}
          </div>
        </fieldset>
        <Field label="Notes on the signs">{(p) => <Textarea {...p} rows={2} value={notes} onChange={(x) => setNotes(x.target.value)} />}</Field>
        {update.error && <Notice tone="danger">{update.error.message}</Notice>}
        <div className="flex justify-end">
          <Button variant="primary" disabled={!dirty} busy={update.isPending} onClick={() => update.mutate({ onsetAt: fromLocal(onset), signs: signs as EpisodeView['signs'], signsNotes: notes })}>
            Save onset and signs
          </Button>
        </div>
      </div>
    </Card>
  );
}

function ActionsCard({ e }: { e: EpisodeView }) {
  const add = useAddAction(e.id);
  const enzymes = useEnzymes();
  const [kind, setKind] = useState<ActionInput['kind']>('hyaluronidase');
  const [at, setAt] = useState(toLocalInput(new Date().toISOString()));
  const [productId, setProductId] = useState('');
  const [lotNumber, setLotNumber] = useState('');
  const [expiryDate, setExpiryDate] = useState('');
  const [amount, setAmount] = useState('');
  const [fromOpenVial, setFromOpenVial] = useState(false);
  const [description, setDescription] = useState('');
  const [scanning, setScanning] = useState(false);
  const [scanNote, setScanNote] = useState<string | null>(null);
  const errors = add.error instanceof ApiError ? add.error.fieldErrors() : {};
  const chosen = enzymes.data?.find((p) => p.id === productId);
  useEffect(() => {
    if (!productId && enzymes.data?.length === 1) setProductId(enzymes.data[0].id);
  }, [enzymes.data, productId]);

  const submit = () => {
    const hy = kind === 'hyaluronidase';
    add.mutate(
      {
        at: fromLocal(at),
        kind,
        description,
        productId: hy ? productId || null : null,
        lotNumber: hy ? lotNumber.trim() || null : null,
        expiryDate: hy ? expiryDate || null : null,
        amount: hy && amount ? Number(amount) : null,
        packsUsed: hy && !fromOpenVial ? 1 : 0,
      },
      {
        onSuccess: () => {
          setDescription('');
          setAmount('');
          setAt(toLocalInput(new Date().toISOString()));
        },
      },
    );
  };

  return (
    <Card>
      <CardHeader title="What was done" />
      <div className="space-y-4 p-5">
        {e.actions.length ? (
          <ol className="space-y-2" aria-label="Actions in time order">
            {e.actions.map((a) => (
              <li key={a.id} className="rounded-lg border border-line px-4 py-2.5 text-[15px]">
                <span className="font-mono text-sm tabular-nums text-ink-muted">{formatDateTime(a.at)}</span> <Badge>{ACTION_LABELS[a.kind]}</Badge>{' '}
                {a.kind === 'hyaluronidase' ? (
                  <span>
                    {a.productName}, lot <span className="font-mono">{a.lotNumber}</span>
                    {a.expiryDate ? `, expiry ${a.expiryDate}` : ''}: <strong>{fmt(a.amount ?? 0)} {a.unitLabel ?? 'U'}</strong>
                    {a.description ? ` · ${a.description}` : ''}
                  </span>
                ) : (
                  <span>{a.description}</span>
                )}
                {a.recordedBy && <span className="ml-2 text-sm text-ink-faint">recorded by {a.recordedBy}</span>}
              </li>
            ))}
          </ol>
        ) : (
          <p className="text-sm text-ink-muted">Nothing recorded yet. Record each step with the time it was done.</p>
        )}
        {add.data?.warnings.map((w) => (
          <Notice key={w.code} tone="warn">
            {w.message}
          </Notice>
        ))}
        <div className="rounded-xl border border-line bg-paper p-4">
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label="What">
              {(p) => (
                <Select {...p} value={kind} onChange={(x) => setKind(x.target.value as ActionInput['kind'])}>
                  {ACTION_KINDS.map((k) => (
                    <option key={k} value={k}>
                      {ACTION_LABELS[k]}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="When" error={errors.at}>
              {(p) => <Input {...p} type="datetime-local" value={at} onChange={(x) => setAt(x.target.value)} />}
            </Field>
          </div>
          {kind === 'hyaluronidase' && (
            <div className="mt-3 space-y-3">
              <div className="flex flex-wrap items-end gap-3">
                <Field label="Product" className="min-w-56 flex-1" error={errors.productId}>
                  {(p) => (
                    <Select {...p} value={productId} onChange={(x) => setProductId(x.target.value)}>
                      <option value="">Choose…</option>
                      {(enzymes.data ?? []).map((x) => (
                        <option key={x.id} value={x.id}>
                          {x.name}
                        </option>
                      ))}
                    </Select>
                  )}
                </Field>
                <Button className="mb-0" onClick={() => setScanning(true)}>
                  <ScanLine className="size-4" /> Scan the vial
                </Button>
              </div>
              {scanNote && <Notice tone="warn">{scanNote}</Notice>}
              <div className="grid gap-3 sm:grid-cols-3">
                <Field label="Lot number" error={errors.lotNumber}>
                  {(p) => <Input {...p} value={lotNumber} maxLength={40} autoComplete="off" onChange={(x) => setLotNumber(x.target.value)} />}
                </Field>
                <Field label="Expiry date" error={errors.expiryDate} hint="From the stock list when left empty.">
                  {(p) => <Input {...p} type="date" value={expiryDate} onChange={(x) => setExpiryDate(x.target.value)} />}
                </Field>
                <Field label={`Units given (${chosen?.unitLabel ?? 'U'})`} error={errors.amount} hint="As given. The record suggests no amount.">
                  {(p) => <Input {...p} inputMode="decimal" value={amount} onChange={(x) => setAmount(x.target.value)} />}
                </Field>
              </div>
              <label className="flex min-h-11 items-center gap-2 text-sm">
                <input type="checkbox" className="size-5 accent-[var(--color-accent)]" checked={fromOpenVial} onChange={(x) => setFromOpenVial(x.target.checked)} /> From a vial already opened in this episode (no new vial off the shelf)
              </label>
            </div>
          )}
          <Field label={kind === 'hyaluronidase' ? 'Notes' : 'What was done'} className="mt-3" error={errors.description}>
            {(p) => <Textarea {...p} rows={2} value={description} onChange={(x) => setDescription(x.target.value)} />}
          </Field>
          {add.error && !Object.keys(errors).length && <Notice tone="danger" className="mt-3">{add.error.message}</Notice>}
          <div className="mt-3 flex justify-end">
            <Button variant="primary" busy={add.isPending} onClick={submit}>
              Record this step
            </Button>
          </div>
        </div>
        <LabelScanner
          open={scanning}
          title="Scan the hyaluronidase vial"
          onClose={() => setScanning(false)}
          onScan={({ data }) => {
            setScanning(false);
            const product = data.gtin ? enzymes.data?.find((p) => p.gtin === data.gtin) : undefined;
            if (product) setProductId(product.id);
            if (data.lotNumber) setLotNumber(data.lotNumber);
            if (data.expiryDate) setExpiryDate(data.expiryDate);
            setScanNote(data.gtin && !product ? `GTIN ${data.gtin} is not a hyaluronidase product of the catalogue: choose the product by hand.` : null);
          }}
        />
      </div>
    </Card>
  );
}

function FollowUpsCard({ e }: { e: EpisodeView }) {
  const add = useAddFollowUp(e.id);
  const [at, setAt] = useState(toLocalInput(new Date().toISOString()));
  const [notes, setNotes] = useState('');
  const [book, setBook] = useState(true);
  return (
    <Card>
      <CardHeader title="Follow-up and photos" />
      <div className="space-y-4 p-5">
        <p className="text-sm text-ink-muted">Photos of the episode are taken in a follow-up visit and shown next to the same view from the treatment visit.</p>
        {e.followUps.map((f) => (
          <div key={f.id} className="rounded-lg border border-line p-4">
            <div className="flex flex-wrap items-center justify-between gap-2">
              <p>
                <span className="font-medium">{formatDateTime(f.at)}</span>
                {f.notes && <span className="ml-2 text-ink-muted">{f.notes}</span>}
              </p>
              {f.visitId && (
                <Link to={`/visits/${f.visitId}/photos`} className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-4 text-sm font-medium hover:bg-paper-sunk">
                  <Camera className="size-4" aria-hidden /> Take photos
                </Link>
              )}
            </div>
            {f.photos.length > 0 && (
              <div className="mt-3 grid gap-3 sm:grid-cols-2">
                {f.photos.map((p) => (
                  <figure key={p.photo.id} className="rounded-lg bg-photo-surround p-2">
                    <div className="grid grid-cols-2 gap-2">
                      {p.baseline ? <img src={`/api/photos/${p.baseline.id}/file?variant=thumb`} alt={`Baseline, ${p.viewKey}`} className="aspect-[4/5] w-full object-contain" /> : <span className="grid place-items-center text-sm text-white/80">No baseline</span>}
                      <img src={`/api/photos/${p.photo.id}/file?variant=thumb`} alt={`Episode, ${p.viewKey}`} className="aspect-[4/5] w-full object-contain" />
                    </div>
                    <figcaption className="mt-1 text-xs text-white/85">
                      {p.viewKey}: baseline {p.baseline ? formatDateTime(p.baseline.capturedAt) : '—'} · episode {formatDateTime(p.photo.capturedAt)}
                    </figcaption>
                  </figure>
                ))}
              </div>
            )}
          </div>
        ))}
        <div className="grid gap-3 rounded-xl border border-line bg-paper p-4 sm:grid-cols-[minmax(0,14rem)_minmax(0,1fr)]">
          <Field label="Follow-up at">{(p) => <Input {...p} type="datetime-local" value={at} onChange={(x) => setAt(x.target.value)} />}</Field>
          <Field label="Notes">{(p) => <Input {...p} value={notes} onChange={(x) => setNotes(x.target.value)} />}</Field>
          <label className="flex min-h-11 items-center gap-2 text-sm sm:col-span-2">
            <input type="checkbox" className="size-5 accent-[var(--color-accent)]" checked={book} onChange={(x) => setBook(x.target.checked)} /> Book a follow-up visit at this time (for photos)
          </label>
          {add.error && <Notice tone="danger" className="sm:col-span-2">{add.error.message}</Notice>}
          <div className="flex justify-end sm:col-span-2">
            <Button variant="primary" busy={add.isPending} onClick={() => add.mutate({ at: fromLocal(at), notes, bookVisit: book }, { onSuccess: () => setNotes('') })}>
              Add follow-up
            </Button>
          </div>
        </div>
      </div>
    </Card>
  );
}

function OutcomeCard({ e }: { e: EpisodeView }) {
  const update = useUpdateEpisode(e.id);
  const [outcome, setOutcome] = useState(e.outcome ?? '');
  const [notes, setNotes] = useState(e.outcomeNotes);
  return (
    <Card>
      <CardHeader title="Outcome" action={e.outcomeAt ? <span className="text-sm text-ink-muted">Recorded {formatDateTime(e.outcomeAt)}</span> : undefined} />
      <div className="grid gap-3 p-5 sm:grid-cols-[minmax(0,16rem)_minmax(0,1fr)]">
        <Field label="Outcome">
          {(p) => (
            <Select {...p} value={outcome} onChange={(x) => setOutcome(x.target.value)}>
              <option value="">Not yet known</option>
              {OUTCOMES.map((o) => (
                <option key={o} value={o}>
                  {OUTCOME_LABELS[o]}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Notes on the outcome">{(p) => <Textarea {...p} rows={2} value={notes} onChange={(x) => setNotes(x.target.value)} />}</Field>
        {update.error && <Notice tone="danger" className="sm:col-span-2">{update.error.message}</Notice>}
        <div className="flex justify-end sm:col-span-2">
          <Button variant="primary" busy={update.isPending} onClick={() => update.mutate({ outcome: (outcome || null) as EpisodeView['outcome'], outcomeNotes: notes })}>
            Save outcome
          </Button>
        </div>
      </div>
    </Card>
  );
}
