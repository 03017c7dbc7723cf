import { useEffect, useState } from 'react';
import { Plus, Trash2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Input, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDateTime } from '../../../lib/format';
import { useConsultation, useSaveConsultation } from '../api/treatments';
import { ReferencePictures } from './reference-pictures';
import { GOAL_LABELS, type Consultation, type ConsultationInput, type PlanStage } from '../types';

const RATIOS: { key: NonNullable<Consultation['targetRatio']>; label: string }[] = [
  { key: '1:1', label: 'Equal lips (1:1)' },
  { key: '1:1.6', label: 'Upper slightly smaller (1:1.6)' },
  { key: '1:2', label: 'Lower twice the upper (1:2)' },
  { key: 'custom', label: 'Custom' },
];

/** Goals, the chosen upper:lower ratio and a staged plan, recorded at the consultation. */
export function ConsultationForm({ visitId, patientId, defaultOpen }: { visitId: string; patientId: string; defaultOpen: boolean }) {
  const { data, isPending, error } = useConsultation(visitId);
  const save = useSaveConsultation(visitId);
  const [open, setOpen] = useState(defaultOpen);
  const [goals, setGoals] = useState<string[]>([]);
  const [goalsText, setGoalsText] = useState('');
  const [ratio, setRatio] = useState<Consultation['targetRatio']>(null);
  const [custom, setCustom] = useState('');
  const [expectations, setExpectations] = useState('');
  const [plan, setPlan] = useState<PlanStage[]>([]);
  const [loaded, setLoaded] = useState(false);

  useEffect(() => {
    if (loaded || isPending) return;
    if (data) {
      setGoals(data.goals);
      setGoalsText(data.goalsText);
      setRatio(data.targetRatio);
      setCustom(data.customRatio ? String(data.customRatio) : '');
      setExpectations(data.expectations);
      setPlan(data.plan);
      setOpen(true);
    }
    setLoaded(true);
  }, [loaded, isPending, data]);

  if (isPending) return <Spinner label="Loading the consultation" />;
  if (error) return <Notice tone="danger">{error.message}</Notice>;
  const errors = save.error instanceof ApiError ? save.error.fieldErrors() : {};
  const submit = () => {
    const input: ConsultationInput = {
      goals: goals as ConsultationInput['goals'],
      goalsText,
      targetRatio: ratio,
      customRatio: ratio === 'custom' && custom ? Number(custom) : null,
      expectations,
      plan: plan.map((s) => ({ label: s.label, plannedDate: s.plannedDate || null, plannedAmountMl: s.plannedAmountMl })),
    };
    save.mutate(input);
  };
  const setStage = (i: number, patch: Partial<PlanStage>) => setPlan(plan.map((s, j) => (j === i ? { ...s, ...patch } : s)));

  return (
    <Card>
      <CardHeader
        title="Consultation"
        action={
          <div className="flex items-center gap-2">
            {(save.data ?? data) && <Badge tone="done">Saved {formatDateTime((save.data ?? data)!.updatedAt)}</Badge>}
            <Button size="sm" variant="ghost" aria-expanded={open} onClick={() => setOpen(!open)}>
              {open ? 'Hide' : 'Open'}
            </Button>
          </div>
        }
      />
      {open && (
        <div className="space-y-5 p-5">
          <fieldset>
            <legend className="mb-1.5 text-sm font-medium text-ink-muted">The patient’s goals</legend>
            <div className="flex flex-wrap gap-2">
              {Object.entries(GOAL_LABELS).map(([k, label]) => (
                <button
                  key={k}
                  type="button"
                  aria-pressed={goals.includes(k)}
                  onClick={() => setGoals(goals.includes(k) ? goals.filter((g) => g !== k) : [...goals, k])}
                  className={cn('min-h-11 rounded-full border px-4 text-sm', goals.includes(k) ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper-raised hover:bg-paper-sunk')}
                >
                  {label}
                </button>
              ))}
            </div>
            {errors.goals && <p className="mt-1 text-sm text-danger">{errors.goals}</p>}
          </fieldset>
          <Field label="In the patient’s words">{(p) => <Textarea {...p} rows={2} value={goalsText} onChange={(e) => setGoalsText(e.target.value)} />}</Field>

          <fieldset>
            <legend className="mb-1.5 text-sm font-medium text-ink-muted">Target upper : lower lip ratio</legend>
            <div className="flex flex-wrap items-center gap-2">
              {RATIOS.map((r) => (
                <label key={r.key} className={cn('flex min-h-11 cursor-pointer items-center gap-2 rounded-lg border px-3 text-sm', ratio === r.key ? 'border-ink bg-paper-sunk' : 'border-line-strong')}>
                  <input type="radio" name={`ratio-${visitId}`} checked={ratio === r.key} onChange={() => setRatio(r.key)} className="size-4 accent-[var(--color-ink)]" />
                  {r.label}
                </label>
              ))}
              {ratio === 'custom' && (
                <label className="flex items-center gap-2 text-sm">
                  1 :
                  <Input aria-label="Custom ratio, lower per upper" className="w-24" inputMode="decimal" value={custom} onChange={(e) => setCustom(e.target.value)} aria-invalid={Boolean(errors.customRatio)} />
                </label>
              )}
            </div>
            {errors.customRatio && <p className="mt-1 text-sm text-danger">{errors.customRatio}</p>}
            <p className="mt-1 text-sm text-ink-faint">Ratios are a guide for discussion, not a treatment target. The choice becomes the patient’s target in the measurements.</p>
          </fieldset>

          <Field label="Expectations discussed">{(p) => <Textarea {...p} rows={2} value={expectations} onChange={(e) => setExpectations(e.target.value)} />}</Field>

          <fieldset className="space-y-2">
            <legend className="mb-1.5 text-sm font-medium text-ink-muted">Staged plan</legend>
            {plan.map((s, i) => (
              <div key={i} className="grid items-end gap-2 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_minmax(0,0.8fr)_auto]">
                <Field label={`Stage ${i + 1}`} error={errors[`plan.${i}.label`]}>
                  {(p) => <Input {...p} value={s.label} placeholder="e.g. 1 mL today" onChange={(e) => setStage(i, { label: e.target.value })} />}
                </Field>
                <Field label="Planned date">{(p) => <Input {...p} type="date" value={s.plannedDate ?? ''} onChange={(e) => setStage(i, { plannedDate: e.target.value || null })} />}</Field>
                <Field label="Planned mL" error={errors[`plan.${i}.plannedAmountMl`]}>
                  {(p) => (
                    <Input {...p} inputMode="decimal" value={s.plannedAmountMl ?? ''} onChange={(e) => setStage(i, { plannedAmountMl: e.target.value ? Number(e.target.value) : null })} />
                  )}
                </Field>
                <Button size="icon" variant="ghost" aria-label={`Remove stage ${i + 1}`} onClick={() => setPlan(plan.filter((_, j) => j !== i))}>
                  <Trash2 className="size-4" />
                </Button>
              </div>
            ))}
            {plan.length < 8 && (
              <Button size="sm" variant="ghost" onClick={() => setPlan([...plan, { label: plan.length === 0 ? '1 mL today' : 'Review in 2–4 weeks, top-up if needed', plannedDate: null, plannedAmountMl: null }])}>
                <Plus className="size-4" /> Add stage
              </Button>
            )}
          </fieldset>

          {save.error && <Notice tone="danger">{save.error.message}</Notice>}
          <div className="flex justify-end">
            <Button variant="primary" busy={save.isPending} onClick={submit}>
              Save consultation
            </Button>
          </div>
          <ReferencePictures patientId={patientId} visitId={visitId} />
        </div>
      )}
    </Card>
  );
}
