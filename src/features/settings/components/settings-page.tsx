import { useEffect, useState, type FormEvent } from 'react';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Input, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useSettings, useUpdateSettings, type ClinicSettings } from '../api/settings';

type Draft = Omit<ClinicSettings, 'updatedAt'>;
const NUMERIC = ['idleMinutes', 'sessionHours', 'reviewReminderDays', 'maintenanceReminderMonths', 'retentionYears', 'toxinMaintenanceMonths'] as const;
const BOOLEAN = ['prescriberRequired', 'treatmentCardEmail'] as const;

export function SettingsPage() {
  const { data, isPending } = useSettings();
  const save = useUpdateSettings();
  const [draft, setDraft] = useState<Record<keyof Draft, string> | null>(null);
  const [saved, setSaved] = useState(false);

  useEffect(() => {
    if (data && !draft) {
      const { updatedAt: _u, ...rest } = data;
      setDraft(Object.fromEntries(Object.entries(rest).map(([k, v]) => [k, String(v)])) as Record<keyof Draft, string>);
    }
  }, [data, draft]);

  if (isPending || !draft) return <Spinner label="Loading settings" />;
  const errors = save.error instanceof ApiError ? save.error.fieldErrors() : {};
  const bind = (k: keyof Draft) => ({ value: draft[k], onChange: (e: { target: { value: string } }) => (setSaved(false), setDraft({ ...draft, [k]: e.target.value })) });

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const body = Object.fromEntries(
      Object.entries(draft)
        .filter(([k]) => k !== 'updatedById')
        .map(([k, v]) => [k, (NUMERIC as readonly string[]).includes(k) ? Number(v) : (BOOLEAN as readonly string[]).includes(k) ? v === 'true' : v]),
    );
    save.mutate(body, { onSuccess: () => setSaved(true) });
  };

  return (
    <>
      <PageHeader title="Clinic settings" subtitle={data?.updatedAt ? `Last changed ${new Date(data.updatedAt).toLocaleString('en-GB')}` : 'Using the defaults'} />
      <form onSubmit={submit} noValidate className="space-y-4">
        {save.error && !Object.keys(errors).length && <Notice tone="danger">{save.error.message}</Notice>}
        {saved && <Notice tone="done">Settings saved.</Notice>}
        <Card className="grid gap-4 p-5 md:grid-cols-2">
          <Field label="Clinic name" error={errors.clinicName} hint="On consent PDFs, comparison sheets and e-mails.">
            {(p) => <Input {...p} {...bind('clinicName')} />}
          </Field>
          <Field label="Time zone" error={errors.timeZone} hint="An IANA name such as Europe/London.">
            {(p) => <Input {...p} {...bind('timeZone')} />}
          </Field>
          <Field label="Automatic sign-out (minutes idle)" error={errors.idleMinutes} hint="2–60. An unattended tablet clears its screen after this.">
            {(p) => <Input {...p} type="number" min={2} max={60} {...bind('idleMinutes')} />}
          </Field>
          <Field label="Sign in again after (hours)" error={errors.sessionHours} hint="1–24. Every sign-in ends after this, however busy the day.">
            {(p) => <Input {...p} type="number" min={1} max={24} {...bind('sessionHours')} />}
          </Field>
          <Field label="Clinical-record retention (years)" error={errors.retentionYears} hint="Erasure is refused until this long after the last visit.">
            {(p) => <Input {...p} type="number" min={0} max={100} {...bind('retentionYears')} />}
          </Field>
          <Field label="Review reminder (days after treatment)" error={errors.reviewReminderDays} hint="Usually 2–4 weeks: 14–28 days.">
            {(p) => <Input {...p} type="number" min={14} max={28} {...bind('reviewReminderDays')} />}
          </Field>
          <Field label="Maintenance reminder (months after treatment)" error={errors.maintenanceReminderMonths} hint="Lip filler typically lasts about 6–9 months.">
            {(p) => <Input {...p} type="number" min={3} max={18} {...bind('maintenanceReminderMonths')} />}
          </Field>
          <Field label="Neuromodulator maintenance reminder (months)" error={errors.toxinMaintenanceMonths} hint="For a treatment with neuromodulator only. Its effect usually lasts about 3–4 months.">
            {(p) => <Input {...p} type="number" min={2} max={6} {...bind('toxinMaintenanceMonths')} />}
          </Field>
          <Field label="Watermark on showcase exports" error={errors.watermarkText}>
            {(p) => <Input {...p} {...bind('watermarkText')} />}
          </Field>
          <Field label="Caption on showcase exports" error={errors.showcaseCaption}>
            {(p) => <Input {...p} {...bind('showcaseCaption')} />}
          </Field>
        </Card>
        <Card className="space-y-4 p-5">
          <Field
            label="Complication protocol: where it is kept and whom to call"
            error={errors.complicationProtocol}
            hint="Shown on the treatment screen and in every complication episode, e.g. “Vascular occlusion protocol: red folder in treatment room 1, with the emergency kit. On-call prescriber: see the contact sheet.” Do not enter doses."
          >
            {(p) => <Textarea {...p} rows={3} maxLength={500} {...bind('complicationProtocol')} />}
          </Field>
          {BOOLEAN.map((k) => (
            <label key={k} className="flex min-h-11 items-start gap-3 text-[15px]">
              <input
                type="checkbox"
                className="mt-1 size-5 accent-[var(--color-accent)]"
                checked={draft[k] === 'true'}
                onChange={(e) => (setSaved(false), setDraft({ ...draft, [k]: String(e.target.checked) }))}
              />
              <span>
                {k === 'prescriberRequired' ? (
                  <>
                    <span className="block font-medium">Prescriber record for neuromodulator</span>
                    <span className="block text-sm text-ink-muted">A neuromodulator line given by an injector who is not a prescriber needs the prescriber, their registration number and the date of the face-to-face assessment. Local rules decide whether this applies.</span>
                  </>
                ) : (
                  <>
                    <span className="block font-medium">E-mail a treatment card after each treatment</span>
                    <span className="block text-sm text-ink-muted">The patient receives the product names, lot numbers and the date, for their own records and for any other clinician they see.</span>
                  </>
                )}
              </span>
            </label>
          ))}
        </Card>
        <Notice>Retention periods and consent rules differ by country and profession. Follow local law and your professional body's guidance; Twinframe only enforces the numbers set here.</Notice>
        <div className="flex justify-end">
          <Button type="submit" variant="primary" busy={save.isPending}>
            Save settings
          </Button>
        </div>
      </form>
    </>
  );
}
