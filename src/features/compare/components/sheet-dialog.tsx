import { useState } from 'react';
import { Download, Mail } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { downloadComparisonSheet, emailComparisonSheet } from '../api/compare';
import type { StripItem } from './compare-viewer';

/** At most this many photos fit a sheet; a longer history is sampled evenly, first and latest always included. */
export const SHEET_MAX_PHOTOS = 12;

export function sampleEvenly<T>(items: T[], n: number): T[] {
  if (items.length <= n) return items;
  const out: T[] = [];
  for (let i = 0; i < n; i++) out.push(items[Math.round((i * (items.length - 1)) / (n - 1))]);
  return out;
}

export function SheetDialog({
  open,
  onClose,
  patient,
  view,
  pair,
  strip,
  aligned,
}: {
  open: boolean;
  onClose: () => void;
  patient: { id: string; email: string | null };
  view: { key: string; label: string };
  pair: [string, string] | null;
  strip: StripItem[];
  aligned: boolean;
}) {
  const [layout, setLayout] = useState<'pair' | 'strip'>(pair ? 'pair' : 'strip');
  const [busy, setBusy] = useState<'download' | 'email' | null>(null);
  const [message, setMessage] = useState<{ tone: 'done' | 'danger'; text: string } | null>(null);
  const stripIds = sampleEvenly(strip, SHEET_MAX_PHOTOS).map((s) => s.photo.id);
  const photoIds = layout === 'pair' && pair ? pair : stripIds;
  const body = { view: view.key, layout, photoIds, aligned };
  const canSend = photoIds.length >= 2;

  const run = async (what: 'download' | 'email') => {
    setBusy(what);
    setMessage(null);
    try {
      if (what === 'download') {
        await downloadComparisonSheet(patient.id, body, `comparison-${view.key}.pdf`);
        setMessage({ tone: 'done', text: 'The comparison sheet was downloaded.' });
      } else {
        const r = await emailComparisonSheet(patient.id, body);
        setMessage({ tone: 'done', text: `The comparison sheet is on its way to ${r.to}.` });
      }
    } catch (e) {
      setMessage({ tone: 'danger', text: e instanceof ApiError || e instanceof Error ? e.message : 'Something went wrong.' });
    } finally {
      setBusy(null);
    }
  };

  return (
    <Dialog open={open} onClose={onClose} title="Comparison sheet">
      <div className="space-y-4">
        <p className="text-ink-muted">A PDF for the patient&rsquo;s own record: {view.label.toLowerCase()}, with dates, measurements, the target ratio and the usual cautions.</p>
        <fieldset className="space-y-2">
          <legend className="mb-1 text-sm font-medium text-ink-muted">What goes on the sheet</legend>
          <label className="flex min-h-11 items-center gap-3 rounded-lg border border-line px-3">
            <input type="radio" name="sheet-layout" checked={layout === 'pair'} disabled={!pair} onChange={() => setLayout('pair')} className="size-5 accent-ink" />
            The pair on screen (baseline and follow-up)
          </label>
          <label className="flex min-h-11 items-center gap-3 rounded-lg border border-line px-3">
            <input type="radio" name="sheet-layout" checked={layout === 'strip'} onChange={() => setLayout('strip')} className="size-5 accent-ink" />
            All visits of this view
            {strip.length > SHEET_MAX_PHOTOS && <span className="text-sm text-ink-faint">({SHEET_MAX_PHOTOS} of {strip.length}, spread evenly)</span>}
          </label>
        </fieldset>
        <p className="text-sm text-ink-muted">Photos: {aligned ? 'aligned to the standard frame where available' : 'as taken'}.</p>
        {message && <Notice tone={message.tone}>{message.text}</Notice>}
        <div className="flex flex-wrap justify-end gap-2">
          <Button onClick={() => run('email')} disabled={!canSend || !patient.email} busy={busy === 'email'} title={patient.email ? undefined : 'No e-mail address on file'}>
            <Mail className="size-4" aria-hidden /> {patient.email ? `E-mail to ${patient.email}` : 'No e-mail address on file'}
          </Button>
          <Button variant="primary" onClick={() => run('download')} disabled={!canSend} busy={busy === 'download'}>
            <Download className="size-4" aria-hidden /> Download PDF
          </Button>
        </div>
      </div>
    </Dialog>
  );
}
