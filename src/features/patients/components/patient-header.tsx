import { useState } from 'react';
import { Mail, Pencil, Phone } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { ageFrom, formatDate } from '../../../lib/format';
import { useUpdatePatient } from '../api/patients';
import type { Patient } from '../types';
import { PatientForm } from './patient-form';

export function PatientHeader({ patient }: { patient: Patient }) {
  const [editing, setEditing] = useState(false);
  const update = useUpdatePatient(patient.id);
  return (
    <header className="mb-5 flex flex-wrap items-start justify-between gap-4">
      <div className="min-w-0">
        <p className="font-mono text-sm text-ink-faint">{patient.code}</p>
        <h1 className="text-3xl font-semibold">
          {patient.firstName} {patient.lastName}
        </h1>
        <p className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-ink-muted">
          <span>
            Born {formatDate(patient.dateOfBirth)} · {ageFrom(patient.dateOfBirth)} years
          </span>
          {patient.email && (
            <span className="inline-flex items-center gap-1.5">
              <Mail className="size-4" aria-hidden /> {patient.email}
            </span>
          )}
          {patient.phone && (
            <span className="inline-flex items-center gap-1.5">
              <Phone className="size-4" aria-hidden /> {patient.phone}
            </span>
          )}
        </p>
      </div>
      <Button onClick={() => setEditing(true)}>
        <Pencil className="size-4" /> Edit details
      </Button>
      <Dialog open={editing} onClose={() => setEditing(false)} title="Edit patient details">
        <PatientForm
          initial={patient}
          submitLabel="Save changes"
          onCancel={() => setEditing(false)}
          onSubmit={async (values) => {
            await update.mutateAsync(values);
            setEditing(false);
          }}
        />
      </Dialog>
    </header>
  );
}
