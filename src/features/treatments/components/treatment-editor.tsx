import { useEffect, useMemo, useState } from 'react';
import { Minus, Plus, Trash2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Input, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { usePatientTreatments, useProducts, useSaveTreatment, useScreening, useTreatment, useTreatmentSettings } from '../api/treatments';
import { ADVERSE_EVENT_LABELS, ANAESTHETIC_LABELS, DEPTH_LABELS, TECHNIQUE_LABELS, type Product, type TreatmentInput, type TreatmentView } from '../types';
import { DEFAULT_STEP, STEPS, ZONE_LABELS, ZONES_OF_KIND, type LineKind, type ZoneKey } from '../zones';
import { ComplicationCaution } from './complication-caution';
import { LipDiagram } from './lip-diagram';

/** One product line while it is edited. Amounts are integer thousandths so taps add up exactly. */
interface LineDraft {
  key: string;
  productId: string;
  lotNumber: string;
  expiryDate: string;
  milli: Partial<Record<ZoneKey, number>>;
  techniques: string[];
  device: '' | 'needle' | 'cannula';
  gauge: string;
  depth: string;
  notes: string;
}

const newKey = () => Math.random().toString(36).slice(2);
const emptyLine = (productId = ''): LineDraft => ({ key: newKey(), productId, lotNumber: '', expiryDate: '', milli: {}, techniques: [], device: '', gauge: '', depth: '', notes: '' });
const fromMilli = (m: number) => m / 1000;
const toMilli = (n: number) => Math.round(n * 1000);
const fmt = (n: number) => String(Math.round(n * 100) / 100);

function draftFrom(t: TreatmentView): LineDraft[] {
  return t.lines.map((l) => ({
    key: newKey(),
    productId: l.productId,
    lotNumber: l.lotNumber ?? '',
    expiryDate: l.expiryDate ?? '',
    milli: Object.fromEntries(l.doses.map((d) => [d.zone, toMilli(d.amount)])),
    techniques: l.techniques,
    device: (l.device ?? '') as LineDraft['device'],
    gauge: l.gauge ? String(l.gauge) : '',
    depth: l.depth ?? '',
    notes: l.notes,
  }));
}

/** Today's date in the clinic's time zone, for the live expiry check (the server checks again on save). */
const todayIn = (timeZone: string) => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date());
const daysBetween = (from: string, to: string) => Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);

/** The treatment record of a visit: product lines, the lip diagram, the dose table, totals, warnings and cautions. */
export function TreatmentEditor({ visitId, patientId }: { visitId: string; patientId: string }) {
  const treatment = useTreatment(visitId);
  const history = usePatientTreatments(patientId);
  const products = useProducts();
  const settings = useTreatmentSettings();
  const screening = useScreening(visitId);
  const save = useSaveTreatment(visitId);

  const [lines, setLines] = useState<LineDraft[] | null>(null);
  const [active, setActive] = useState(0);
  const [step, setStep] = useState<number | null>(null);
  const [anaesthetic, setAnaesthetic] = useState('none');
  const [anaestheticNotes, setAnaestheticNotes] = useState('');
  const [adverseEvents, setAdverseEvents] = useState<string[]>([]);
  const [adverseEventNotes, setAdverseEventNotes] = useState('');
  const [notes, setNotes] = useState('');
  const [reviewAfterDays, setReviewAfterDays] = useState<number | null>(null);
  const [savedAt, setSavedAt] = useState<string | null>(null);

  // Fill the form once from the stored record (or a first empty line with the first filler).
  useEffect(() => {
    if (lines || treatment.isPending || !products.data) return;
    const t = treatment.data;
    if (t) {
      setLines(draftFrom(t));
      setAnaesthetic(t.anaesthetic);
      setAnaestheticNotes(t.anaestheticNotes);
      setAdverseEvents(t.adverseEvents);
      setAdverseEventNotes(t.adverseEventNotes);
      setNotes(t.notes);
    } else {
      setLines([emptyLine(products.data.find((p) => p.kind === 'filler')?.id ?? '')]);
    }
  }, [lines, treatment.isPending, treatment.data, products.data]);

  const byId = useMemo(() => new Map((products.data ?? []).map((p) => [p.id, p])), [products.data]);
  // Products on the stored record stay selectable even if the catalogue retired them since.
  const productOf = (l: LineDraft): Product | undefined =>
    byId.get(l.productId) ??
    (() => {
      const stored = treatment.data?.lines.find((x) => x.productId === l.productId);
      return stored ? { id: stored.productId, name: stored.productName, kind: stored.kind, unit: stored.unit, manufacturer: stored.manufacturer, unitLabel: null, packSize: null, gtin: null, active: false } : undefined;
    })();

  if (treatment.isPending || products.isPending || settings.isPending || !lines) return <Spinner label="Loading the treatment record" />;
  if (treatment.error || products.error || settings.error) return <Notice tone="danger">{(treatment.error ?? products.error ?? settings.error)!.message}</Notice>;
  const cfg = settings.data!;
  const today = todayIn(cfg.timeZone);

  const current = lines[Math.min(active, lines.length - 1)];
  const currentProduct = productOf(current);
  const kind: LineKind = currentProduct?.kind === 'toxin' ? 'toxin' : 'filler';
  const unit = kind === 'filler' ? 'mL' : 'U';
  const stepNow = step !== null && STEPS[kind].includes(step) ? step : DEFAULT_STEP[kind];
  const flagsOpen = Boolean(screening.data?.screening && !screening.data.screening.allAcknowledged);

  const update = (i: number, patch: Partial<LineDraft>) => {
    setLines((ls) => ls!.map((l, j) => (j === i ? { ...l, ...patch } : l)));
    setSavedAt(null);
  };
  const addTo = (i: number, zone: ZoneKey, deltaMilli: number) => {
    const l = lines[i];
    const next = Math.max(0, (l.milli[zone] ?? 0) + deltaMilli);
    const milli = { ...l.milli };
    if (next === 0) delete milli[zone];
    else milli[zone] = next;
    update(i, { milli });
  };

  // Live totals: per zone over all lines, per kind, per side for toxin.
  const fillerByZone: Partial<Record<ZoneKey, number>> = {};
  const toxinByZone: Partial<Record<ZoneKey, number>> = {};
  let fillerMilli = 0;
  let toxinMilli = 0;
  for (const l of lines) {
    const p = productOf(l);
    if (!p) continue;
    for (const [zone, m] of Object.entries(l.milli) as [ZoneKey, number][]) {
      const into = p.kind === 'filler' ? fillerByZone : toxinByZone;
      into[zone] = (into[zone] ?? 0) + m;
      if (p.kind === 'filler') fillerMilli += m;
      else toxinMilli += m;
    }
  }
  const highVolume = fillerMilli > toMilli(cfg.highVolumeMl);
  // The patient's cumulative filler before this visit (the server's per-patient totals, this visit left out).
  const others = (history.data?.treatments ?? []).filter((t) => t.visitId !== visitId);
  const earlier = others.length
    ? { count: others.length, fillerMl: fromMilli(others.reduce((n, t) => n + toMilli(t.totals.fillerMl), 0)), last: others[others.length - 1].treatedAt }
    : null;

  const lineIssues = lines.map((l) => {
    const out: { tone: 'warn' | 'danger' | 'info'; text: string }[] = [];
    if (l.expiryDate) {
      const left = daysBetween(today, l.expiryDate);
      if (left < 0) out.push({ tone: 'danger', text: `Expired on ${formatDate(l.expiryDate)}: an expired product must not be used.` });
      else if (left === 0) out.push({ tone: 'warn', text: 'Expires today.' });
      else if (left <= cfg.lotWarnDays) out.push({ tone: 'warn', text: `Expires in ${left} ${left === 1 ? 'day' : 'days'}.` });
    }
    if (!l.lotNumber.trim() && Object.keys(l.milli).length) out.push({ tone: 'info', text: 'No lot number yet: it stays an open item of the visit until entered.' });
    return out;
  });
  const expired = lineIssues.some((x) => x.some((i) => i.tone === 'danger'));

  const submit = () => {
    const input: TreatmentInput = {
      lines: lines.map((l) => ({
        productId: l.productId,
        unit: productOf(l)?.unit ?? 'mL',
        lotNumber: l.lotNumber.trim() || null,
        expiryDate: l.expiryDate || null,
        doses: (Object.entries(l.milli) as [ZoneKey, number][]).map(([zone, m]) => ({ zone, amount: fromMilli(m) })),
        techniques: l.techniques as TreatmentInput['lines'][number]['techniques'],
        device: l.device || null,
        gauge: l.gauge ? Number(l.gauge) : null,
        depth: (l.depth || null) as TreatmentInput['lines'][number]['depth'],
        notes: l.notes,
      })),
      anaesthetic: anaesthetic as TreatmentInput['anaesthetic'],
      anaestheticNotes,
      adverseEvents: adverseEvents as TreatmentInput['adverseEvents'],
      adverseEventNotes,
      notes,
      ...(reviewAfterDays ? { reviewAfterDays } : {}),
    };
    save.mutate(input, { onSuccess: (t) => setSavedAt(t.updatedAt) });
  };
  const fieldErrors = save.error instanceof ApiError ? save.error.fieldErrors() : {};
  const stored = save.data ?? treatment.data;

  return (
    <Card>
      <CardHeader title="Treatment record" action={stored ? <Badge tone="done">Recorded {formatDate(stored.treatedAt)}</Badge> : <Badge>Not recorded yet</Badge>} />
      <div className="space-y-5 p-5">
        <ComplicationCaution />

        {/* Line tabs */}
        <div className="flex flex-wrap items-center gap-2" role="tablist" aria-label="Product lines">
          {lines.map((l, i) => {
            const p = productOf(l);
            const total = Object.values(l.milli).reduce((a, b) => a + (b ?? 0), 0);
            return (
              <button
                key={l.key}
                type="button"
                role="tab"
                aria-selected={i === active}
                onClick={() => setActive(i)}
                className={cn(
                  'min-h-11 rounded-lg border px-3 text-left text-sm',
                  i === active ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk',
                )}
              >
                <span className="font-medium">Line {i + 1}</span>
                <span className="ml-2 opacity-80">
                  {p ? p.name : 'Choose a product'} · {fmt(fromMilli(total))} {p?.unit ?? ''}
                </span>
              </button>
            );
          })}
          {lines.length < cfg.limits.linesPerTreatment && (
            <Button
              size="sm"
              variant="ghost"
              onClick={() => {
                setLines([...lines, emptyLine()]);
                setActive(lines.length);
              }}
            >
              <Plus className="size-4" /> Add product line
            </Button>
          )}
        </div>

        <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_minmax(0,1fr)]">
          <Field
            label="Product"
            className="sm:col-span-2 lg:col-span-1"
            hint={currentProduct ? `${currentProduct.manufacturer}${currentProduct.kind === 'filler' ? ' · filler in mL' : ' · neuromodulator in units'}` : undefined}
            error={fieldErrors[`lines.${active}.productId`] ?? fieldErrors[`lines.${active}.unit`]}
          >
            {(p) => (
              <Select {...p} value={current.productId} onChange={(e) => update(active, { productId: e.target.value, milli: {} })}>
                <option value="">Choose a product…</option>
                {(products.data ?? []).filter((x) => x.kind !== 'hyaluronidase').map((x) => (
                  <option key={x.id} value={x.id}>
                    {x.name} ({x.unit})
                  </option>
                ))}
                {currentProduct && !byId.has(currentProduct.id) && <option value={currentProduct.id}>{currentProduct.name} (no longer in the catalogue)</option>}
              </Select>
            )}
          </Field>
          <Field label="Lot number" error={fieldErrors[`lines.${active}.lotNumber`]} hint="As printed on the box.">
            {(p) => <Input {...p} value={current.lotNumber} maxLength={40} autoComplete="off" onChange={(e) => update(active, { lotNumber: e.target.value })} />}
          </Field>
          <Field label="Expiry date" error={fieldErrors[`lines.${active}.expiryDate`]}>
            {(p) => <Input {...p} type="date" value={current.expiryDate} onChange={(e) => update(active, { expiryDate: e.target.value })} />}
          </Field>
        </div>
        {lineIssues[active].map((i) => (
          <Notice key={i.text} tone={i.tone}>
            {i.text}
          </Notice>
        ))}

        <div className="grid gap-5 lg:grid-cols-[minmax(0,1.1fr)_minmax(0,1fr)]">
          {/* Diagram, steps and totals stay in view while the table scrolls. */}
          <div className="space-y-3 lg:sticky lg:top-20 lg:self-start">
            <div className="rounded-xl border border-line bg-paper p-2">
              <LipDiagram kind={kind} unit={unit} amounts={Object.fromEntries(Object.entries(current.milli).map(([z, m]) => [z, fromMilli(m ?? 0)]))} full={kind === 'filler' ? 0.5 : 5} step={stepNow} onTap={(zone) => addTo(active, zone, toMilli(stepNow))} />
            </div>
            <div className="flex flex-wrap items-center gap-2">
              <span className="text-sm text-ink-muted">Each tap adds</span>
              {STEPS[kind].map((s) => (
                <Button key={s} size="sm" variant={s === stepNow ? 'primary' : 'secondary'} aria-pressed={s === stepNow} onClick={() => setStep(s)}>
                  {fmt(s)} {unit}
                </Button>
              ))}
            </div>
            <p className="text-sm text-ink-faint">
              {kind === 'filler' ? 'Filler goes into the lip zones.' : 'Neuromodulator is recorded per side into the depressor anguli oris.'} The patient’s right is on the left of the drawing.
            </p>
            {/* Totals of the session */}
            <section aria-label="Session totals" className="rounded-xl border border-line bg-paper p-4">
              <h3 className="mb-2 text-lg font-semibold">Session totals</h3>
              <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-1">
                <dl className="space-y-1 text-[15px]">
                  {(Object.entries(fillerByZone) as [ZoneKey, number][]).map(([zone, m]) => (
                    <div key={zone} className="flex justify-between gap-3">
                      <dt className="text-ink-muted">{ZONE_LABELS[zone]}</dt>
                      <dd className="font-mono tabular-nums">{fmt(fromMilli(m))} mL</dd>
                    </div>
                  ))}
                  {(Object.entries(toxinByZone) as [ZoneKey, number][]).map(([zone, m]) => (
                    <div key={zone} className="flex justify-between gap-3">
                      <dt className="text-ink-muted">{ZONE_LABELS[zone]}</dt>
                      <dd className="font-mono tabular-nums">{fmt(fromMilli(m))} U</dd>
                    </div>
                  ))}
                  {!fillerMilli && !toxinMilli && <p className="text-ink-faint">Tap the diagram to add amounts.</p>}
                </dl>
                <div className="space-y-1">
                  <p className="flex items-baseline justify-between gap-3 text-lg">
                    <span>Filler this visit</span>
                    <span className="font-mono text-2xl font-semibold tabular-nums" data-testid="filler-total">
                      {fmt(fromMilli(fillerMilli))} mL
                    </span>
                  </p>
                  {toxinMilli > 0 && (
                    <p className="flex items-baseline justify-between gap-3">
                      <span>Neuromodulator</span>
                      <span className="font-mono font-semibold tabular-nums">
                        {fmt(fromMilli(toxinMilli))} U (right {fmt(fromMilli(toxinByZone['dao-right'] ?? 0))}, left {fmt(fromMilli(toxinByZone['dao-left'] ?? 0))})
                      </span>
                    </p>
                  )}
                  {earlier && (
                    <p className="text-sm text-ink-muted" data-testid="patient-to-date">
                      Earlier visits: {fmt(earlier.fillerMl)} mL filler in {earlier.count} {earlier.count === 1 ? 'session' : 'sessions'}, last on {formatDate(earlier.last)}. With this visit:{' '}
                      {fmt(earlier.fillerMl + fromMilli(fillerMilli))} mL.
                    </p>
                  )}
                  {highVolume && (
                    <Notice tone="warn" title="Unusually high volume">
                      More than {cfg.highVolumeMl} mL of filler in one session. Check the amounts; a large change is usually staged over several visits.
                    </Notice>
                  )}
                </div>
              </div>
            </section>
          </div>

          {/* Line fields and dose table */}
          <div className="space-y-4">
            <table className="w-full text-[15px]" aria-label={`Doses of line ${active + 1}`}>
              <thead>
                <tr className="border-b border-line text-left text-sm text-ink-muted">
                  <th className="py-2 font-medium">Zone</th>
                  <th className="py-2 text-right font-medium">{unit}</th>
                  <th className="w-28" />
                </tr>
              </thead>
              <tbody>
                {ZONES_OF_KIND[kind].map((zone) => {
                  const m = current.milli[zone] ?? 0;
                  return (
                    <tr key={zone} className={cn('border-b border-line last:border-0', m > 0 ? '' : 'text-ink-muted')}>
                      <td className="py-1.5">{ZONE_LABELS[zone]}</td>
                      <td className="py-1.5 text-right font-mono tabular-nums" data-zone-amount={zone}>
                        {m ? fmt(fromMilli(m)) : '–'}
                      </td>
                      <td className="py-1 text-right">
                        <span className="inline-flex gap-1">
                          <Button size="icon" variant="ghost" aria-label={`Less in ${ZONE_LABELS[zone]}`} disabled={m === 0} onClick={() => addTo(active, zone, -toMilli(stepNow))}>
                            <Minus className="size-4" />
                          </Button>
                          <Button size="icon" variant="ghost" aria-label={`More in ${ZONE_LABELS[zone]}`} onClick={() => addTo(active, zone, toMilli(stepNow))}>
                            <Plus className="size-4" />
                          </Button>
                        </span>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
              <tfoot>
                <tr className="border-t-2 border-line-strong font-semibold">
                  <td className="py-2">Line {active + 1} total</td>
                  <td className="py-2 text-right font-mono tabular-nums">
                    {fmt(fromMilli(Object.values(current.milli).reduce((a, b) => a + (b ?? 0), 0)))} {unit}
                  </td>
                  <td />
                </tr>
              </tfoot>
            </table>

            <fieldset>
              <legend className="mb-1.5 text-sm font-medium text-ink-muted">Technique</legend>
              <div className="flex flex-wrap gap-2">
                {Object.entries(TECHNIQUE_LABELS).map(([k, label]) => (
                  <Chip key={k} on={current.techniques.includes(k)} onClick={() => update(active, { techniques: toggle(current.techniques, k) })}>
                    {label}
                  </Chip>
                ))}
              </div>
            </fieldset>
            <div className="grid gap-3 sm:grid-cols-3">
              <Field label="Needle or cannula">
                {(p) => (
                  <Select {...p} value={current.device} onChange={(e) => update(active, { device: e.target.value as LineDraft['device'] })}>
                    <option value="">—</option>
                    <option value="needle">Needle</option>
                    <option value="cannula">Cannula</option>
                  </Select>
                )}
              </Field>
              <Field label="Gauge" error={fieldErrors[`lines.${active}.gauge`]}>
                {(p) => (
                  <Select {...p} value={current.gauge} onChange={(e) => update(active, { gauge: e.target.value })}>
                    <option value="">—</option>
                    {[18, 20, 22, 23, 25, 27, 29, 30, 31, 32, 33, 34].map((g) => (
                      <option key={g} value={g}>
                        {g}G
                      </option>
                    ))}
                  </Select>
                )}
              </Field>
              <Field label="Depth">
                {(p) => (
                  <Select {...p} value={current.depth} onChange={(e) => update(active, { depth: e.target.value })}>
                    <option value="">—</option>
                    {Object.entries(DEPTH_LABELS).map(([k, label]) => (
                      <option key={k} value={k}>
                        {label}
                      </option>
                    ))}
                  </Select>
                )}
              </Field>
            </div>
            <Field label="Notes on this line">
              {(p) => <Textarea {...p} rows={2} value={current.notes} onChange={(e) => update(active, { notes: e.target.value })} />}
            </Field>
            {lines.length > 1 && (
              <Button
                variant="danger"
                size="sm"
                onClick={() => {
                  setLines(lines.filter((_, j) => j !== active));
                  setActive(Math.max(0, active - 1));
                }}
              >
                <Trash2 className="size-4" /> Remove line {active + 1}
              </Button>
            )}
          </div>
        </div>

        {/* Session details */}
        <div className="grid gap-3 sm:grid-cols-2">
          <Field label="Anaesthetic">
            {(p) => (
              <Select {...p} value={anaesthetic} onChange={(e) => setAnaesthetic(e.target.value)}>
                {Object.entries(ANAESTHETIC_LABELS).map(([k, label]) => (
                  <option key={k} value={k}>
                    {label}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Anaesthetic notes">{(p) => <Input {...p} value={anaestheticNotes} onChange={(e) => setAnaestheticNotes(e.target.value)} />}</Field>
        </div>
        <fieldset>
          <legend className="mb-1.5 text-sm font-medium text-ink-muted">Adverse events</legend>
          <div className="flex flex-wrap gap-2">
            {Object.entries(ADVERSE_EVENT_LABELS).map(([k, label]) => (
              <Chip key={k} on={adverseEvents.includes(k)} onClick={() => setAdverseEvents(toggle(adverseEvents, k))}>
                {label}
              </Chip>
            ))}
          </div>
        </fieldset>
        {adverseEvents.length > 0 && (
          <Field label="Adverse event details">{(p) => <Textarea {...p} rows={2} value={adverseEventNotes} onChange={(e) => setAdverseEventNotes(e.target.value)} />}</Field>
        )}
        <div className="grid gap-3 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
          <Field label="Treatment notes">{(p) => <Textarea {...p} rows={2} value={notes} onChange={(e) => setNotes(e.target.value)} />}</Field>
          <Field label="Review reminder after" hint="Reviews are usually 2–4 weeks after treatment.">
            {(p) => (
              <Select {...p} value={String(reviewAfterDays ?? cfg.reviewDays)} onChange={(e) => setReviewAfterDays(Number(e.target.value))}>
                {[14, 21, 28].map((d) => (
                  <option key={d} value={d}>
                    {d / 7} weeks
                  </option>
                ))}
              </Select>
            )}
          </Field>
        </div>

        {flagsOpen && <Notice tone="warn">Review and acknowledge the flagged screening answers before recording the treatment.</Notice>}
        {save.error && (
          <Notice tone="danger" title="Not saved">
            {save.error.message}
          </Notice>
        )}
        {savedAt && stored && <SavedSummary t={stored} />}
        <div className="flex flex-wrap items-center justify-end gap-3">
          <Button variant="primary" size="lg" busy={save.isPending} disabled={flagsOpen || expired || lines.some((l) => !l.productId || !Object.keys(l.milli).length)} onClick={submit}>
            {stored ? 'Save changes' : 'Record treatment'}
          </Button>
        </div>
      </div>
    </Card>
  );
}

function toggle(list: string[], key: string): string[] {
  return list.includes(key) ? list.filter((k) => k !== key) : [...list, key];
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

/** What the server made of the save: its warnings and the reminders it planned. */
function SavedSummary({ t }: { t: TreatmentView }) {
  return (
    <Notice tone="done" title="Treatment recorded">
      <ul className="mt-1 space-y-0.5">
        <li>
          {fmt(t.totals.fillerMl)} mL filler{t.totals.toxinU ? `, ${fmt(t.totals.toxinU)} U neuromodulator` : ''}.
        </li>
        {t.reminders
          .filter((r) => r.state === 'scheduled')
          .map((r) => (
            <li key={r.id}>
              {r.kind === 'review' ? 'Review' : 'Maintenance'} reminder e-mailed on {formatDate(r.dueOn)}.
            </li>
          ))}
        {t.warnings.map((w) => (
          <li key={w.code + (w.line ?? '')} className="text-warn">
            {w.message}
          </li>
        ))}
      </ul>
    </Notice>
  );
}
