import { useEffect, useState, type FormEvent } from 'react';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useSettings, useUpdateSettings, type ClinicSettings } from '../api/settings';

type Draft = Omit<ClinicSettings, 'updatedAt'>;
const NUMERIC = ['idleMinutes', 'sessionHours', 'reviewReminderDays', 'maintenanceReminderMonths', 'retentionYears'] as const;

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
    const body = Object.fromEntries(Object.entries(draft).map(([k, v]) => [k, (NUMERIC as readonly string[]).includes(k) ? Number(v) : v]));
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
          <Field label="Watermark on showcase exports" error={errors.watermarkText}>
            {(p) => <Input {...p} {...bind('watermarkText')} />}
          </Field>
          <Field label="Caption on showcase exports" error={errors.showcaseCaption}>
            {(p) => <Input {...p} {...bind('showcaseCaption')} />}
          </Field>
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
