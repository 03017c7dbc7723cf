import { useState, type FormEvent } from 'react';
import { Button } from '../../../components/ui/button';
import { Field, Input, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { toLocalInput } from '../../../lib/format';
import { useCreateVisit, usePractitioners } from '../api/visits';
import { KIND_LABEL, type VisitKind } from '../types';

/** Book a visit for a patient. Coordinators book; clinical notes are left to clinicians. */
export function VisitForm({ patientId, canWriteNotes, onDone }: { patientId: string; canWriteNotes: boolean; onDone: () => void }) {
  const practitioners = usePractitioners();
  const create = useCreateVisit(patientId);
  const nextSlot = new Date(Math.ceil(Date.now() / 1_800_000) * 1_800_000).toISOString();
  const [startsAt, setStartsAt] = useState(toLocalInput(nextSlot));
  const [kind, setKind] = useState<VisitKind>('consultation');
  const [practitionerId, setPractitionerId] = useState('');
  const [notes, setNotes] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    const local: Record<string, string> = {};
    if (!startsAt || Number.isNaN(Date.parse(startsAt))) local.startsAt = 'Choose a date and time.';
    if (!practitionerId) local.practitionerId = 'Choose a practitioner.';
    setErrors(local);
    if (Object.keys(local).length) return;
    try {
      await create.mutateAsync({ startsAt: new Date(startsAt).toISOString(), kind, practitionerId, ...(canWriteNotes && notes ? { notes } : {}) });
      onDone();
    } catch (err) {
      setErrors(err instanceof ApiError ? { ...err.fieldErrors(), root: err.message } : { root: 'Could not book the visit.' });
    }
  };

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {errors.root && <Notice tone="danger">{errors.root}</Notice>}
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Date and time" error={errors.startsAt}>
          {(p) => <Input {...p} type="datetime-local" step={300} value={startsAt} onChange={(e) => setStartsAt(e.target.value)} />}
        </Field>
        <Field label="Kind of visit">
          {(p) => (
            <Select {...p} value={kind} onChange={(e) => setKind(e.target.value as VisitKind)}>
              {Object.entries(KIND_LABEL).map(([k, label]) => (
                <option key={k} value={k}>
                  {label}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      <Field label="Practitioner" error={errors.practitionerId}>
        {(p) => (
          <Select {...p} value={practitionerId} onChange={(e) => setPractitionerId(e.target.value)}>
            <option value="">Choose…</option>
            {practitioners.data?.map((u) => (
              <option key={u.id} value={u.id}>
                {u.name}
              </option>
            ))}
          </Select>
        )}
      </Field>
      {canWriteNotes && (
        <Field label="Notes (optional)" error={errors.notes}>
          {(p) => <Textarea {...p} rows={3} value={notes} onChange={(e) => setNotes(e.target.value)} />}
        </Field>
      )}
      <div className="flex justify-end gap-2 pt-2">
        <Button variant="ghost" onClick={onDone}>
          Cancel
        </Button>
        <Button type="submit" variant="primary" busy={create.isPending}>
          Book visit
        </Button>
      </div>
    </form>
  );
}
