import { zodResolver } from '@hookform/resolvers/zod';
import { useForm, type Path } from 'react-hook-form';
import { patientInputSchema, type PatientInput } from '../../../../server/features/patients/patients.schemas';
import { Button } from '../../../components/ui/button';
import { Field, Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import type { Patient } from '../types';

type FormValues = { firstName: string; lastName: string; dateOfBirth: string; email: string; phone: string };

/** Create or edit a patient's details. Server-side field errors are shown beside their fields. */
export function PatientForm({
  initial,
  onSubmit,
  submitLabel,
  onCancel,
}: {
  initial?: Patient;
  onSubmit: (values: PatientInput) => Promise<unknown>;
  submitLabel: string;
  onCancel?: () => void;
}) {
  const { register, handleSubmit, setError, formState } = useForm<FormValues>({
    resolver: zodResolver(patientInputSchema) as never,
    defaultValues: {
      firstName: initial?.firstName ?? '',
      lastName: initial?.lastName ?? '',
      dateOfBirth: initial?.dateOfBirth ?? '',
      email: initial?.email ?? '',
      phone: initial?.phone ?? '',
    },
  });
  const e = formState.errors;

  const submit = handleSubmit(async (values) => {
    try {
      await onSubmit(values as PatientInput);
    } catch (err) {
      if (err instanceof ApiError) {
        const fields = err.fieldErrors();
        for (const [k, msg] of Object.entries(fields)) setError(k as Path<FormValues>, { message: msg });
        if (Object.keys(fields).length === 0) setError('root', { message: err.message });
      } else setError('root', { message: 'Could not save. Check the connection and try again.' });
    }
  });

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {e.root?.message && <Notice tone="danger">{e.root.message}</Notice>}
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="First name" error={e.firstName?.message}>
          {(p) => <Input {...p} autoComplete="off" {...register('firstName')} />}
        </Field>
        <Field label="Last name" error={e.lastName?.message}>
          {(p) => <Input {...p} autoComplete="off" {...register('lastName')} />}
        </Field>
      </div>
      <Field label="Date of birth" error={e.dateOfBirth?.message}>
        {(p) => <Input {...p} type="date" max={new Date().toISOString().slice(0, 10)} {...register('dateOfBirth')} />}
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="E-mail" error={e.email?.message} hint="Signed consent copies and reminders go here.">
          {(p) => <Input {...p} type="email" inputMode="email" {...register('email')} />}
        </Field>
        <Field label="Phone" error={e.phone?.message}>
          {(p) => <Input {...p} type="tel" inputMode="tel" {...register('phone')} />}
        </Field>
      </div>
      <div className="flex justify-end gap-2 pt-2">
        {onCancel && (
          <Button variant="ghost" onClick={onCancel}>
            Cancel
          </Button>
        )}
        <Button type="submit" variant="primary" busy={formState.isSubmitting}>
          {submitLabel}
        </Button>
      </div>
    </form>
  );
}
