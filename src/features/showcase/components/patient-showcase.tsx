import { useMemo, useState, type FormEvent } from 'react';
import { useSearchParams } from 'react-router-dom';
import { Check } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useCreateShowcaseRequest, usePatientPhotos, usePatientShowcase } from '../api/showcase';
import { CHANNELS, channelLabel, viewLabel, type ShowcaseChannel } from '../types';
import { RequestCard } from './request-card';

/** A patient's showcase permission and requests, and the form to nominate a result for marketing use. */
export function PatientShowcase({ patientId, isAdmin }: { patientId: string; isAdmin: boolean }) {
  const { data, isPending } = usePatientShowcase(patientId);
  if (isPending || !data) return <Spinner label="Loading showcase" />;
  return (
    <div className="space-y-4">
      <Card>
        <CardHeader title="Showcase consent" />
        <div className="p-5">
          {data.consent ? (
            <p>
              Signed {formatDate(data.consent.signedAt)} (form v{data.consent.templateVersion}) for <strong>{data.consent.channels.map(channelLabel).join(', ') || 'no channel'}</strong>,{' '}
              {data.consent.crop === 'face' ? 'face may be shown' : 'lips-only crop'}.
            </p>
          ) : (
            <Notice tone="warn" title="No current showcase consent">
              This patient's photos cannot be used for marketing. If they wish to allow it, start a hand-over with the showcase consent from the Consents tab. It is optional and can be
              withdrawn at any time.
            </Notice>
          )}
        </div>
      </Card>
      {data.consent && data.consent.channels.length > 0 && <NominateForm patientId={patientId} allowed={data.consent.channels} />}
      <section aria-label="Showcase requests" className="space-y-3">
        <h2 className="text-xl font-semibold">Requests</h2>
        {data.requests.length ? data.requests.map((r) => <RequestCard key={r.id} request={r} admin={isAdmin} />) : <EmptyState title="No showcase requests for this patient" />}
      </section>
    </div>
  );
}

/** Nominate a result. `?view=…&photos=a,b` (as the compare screen links here) preselects the pair shown there. */
function NominateForm({ patientId, allowed }: { patientId: string; allowed: ShowcaseChannel[] }) {
  const [params] = useSearchParams();
  const photos = usePatientPhotos(patientId);
  const create = useCreateShowcaseRequest(patientId);
  const current = useMemo(() => (photos.data ?? []).filter((p) => p.state === 'captured').sort((a, b) => (a.capturedAt < b.capturedAt ? -1 : 1)), [photos.data]);
  const views = [...new Set(current.map((p) => p.viewKey))];
  const [viewKey, setViewKey] = useState(params.get('view') ?? '');
  const [picked, setPicked] = useState<string[]>(() => (params.get('photos') ?? '').split(',').filter(Boolean));
  const [channels, setChannels] = useState<ShowcaseChannel[]>([]);
  const [note, setNote] = useState('');
  const view = viewKey || views[0] || '';
  const ofView = current.filter((p) => p.viewKey === view);

  const toggle = <T,>(list: T[], v: T) => (list.includes(v) ? list.filter((x) => x !== v) : [...list, v]);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate({ viewKey: view, photoIds: picked, channels, note: note || undefined }, { onSuccess: () => (setPicked([]), setChannels([]), setNote('')) });
  };
  if (photos.isPending) return <Spinner label="Loading photos" />;
  if (!current.length) return null;

  return (
    <Card>
      <CardHeader title="Nominate a result" />
      <form onSubmit={submit} className="space-y-4 p-5" noValidate>
        {create.error && <Notice tone="danger">{create.error instanceof ApiError ? create.error.message : 'Could not send the request.'}</Notice>}
        {create.isSuccess && <Notice tone="done">Request sent to the clinic admin for clearance.</Notice>}
        <Field label="View">
          {(p) => (
            <Select
              {...p}
              value={view}
              onChange={(e) => {
                setViewKey(e.target.value);
                setPicked([]);
              }}
            >
              {views.map((v) => (
                <option key={v} value={v}>
                  {viewLabel(v)}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <fieldset>
          <legend className="mb-2 text-sm font-medium text-ink-muted">Photos (two for a before/after pair, more for a strip)</legend>
          <div className="flex flex-wrap gap-2 rounded-lg bg-photo-surround p-2">
            {ofView.map((p) => {
              const on = picked.includes(p.id);
              const thumb = p.variants.find((v) => v.variant === 'thumb' && v.format === 'webp') ?? p.variants.find((v) => v.variant === 'thumb');
              return (
                <button
                  type="button"
                  key={p.id}
                  aria-pressed={on}
                  aria-label={`Photo of ${formatDate(p.capturedAt)}`}
                  onClick={() => setPicked(toggle(picked, p.id))}
                  className={cn('relative rounded-md outline-offset-2', on && 'outline-3 outline-white')}
                >
                  <img src={thumb?.url} alt="" className="h-28 w-24 rounded-md object-cover" loading="lazy" />
                  <span className="absolute inset-x-0 bottom-0 rounded-b-md bg-black/55 px-1 py-0.5 text-center text-xs text-white">{formatDate(p.capturedAt)}</span>
                  {on && <Check className="absolute top-1 right-1 size-5 rounded-full bg-white p-0.5 text-ink" aria-hidden />}
                </button>
              );
            })}
          </div>
        </fieldset>
        <fieldset>
          <legend className="mb-2 text-sm font-medium text-ink-muted">Channels (only those the patient consented to)</legend>
          <div className="flex flex-wrap gap-2">
            {CHANNELS.filter((c) => allowed.includes(c.key)).map((c) => (
              <label key={c.key} className="flex min-h-11 cursor-pointer items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-3">
                <input type="checkbox" className="size-5 accent-[var(--color-accent)]" checked={channels.includes(c.key)} onChange={() => setChannels(toggle(channels, c.key))} />
                {c.label}
              </label>
            ))}
          </div>
        </fieldset>
        <Field label="Note for the admin (optional)">{(p) => <Textarea {...p} rows={2} value={note} onChange={(e) => setNote(e.target.value)} />}</Field>
        <div className="flex justify-end">
          <Button type="submit" variant="primary" disabled={picked.length < 2 || channels.length === 0} busy={create.isPending}>
            Request clearance
          </Button>
        </div>
      </form>
    </Card>
  );
}
