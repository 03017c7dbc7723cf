import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { Download, Trash2 } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { downloadPatientExport, useErasePatient } from '../api/patient-data';

/** Admin-only: hand a patient all their data, or erase it once the retention period allows. */
export function PatientDataPanel({ patient }: { patient: { id: string; firstName: string; lastName: string } }) {
  const [progress, setProgress] = useState<number | null>(null);
  const [exportError, setExportError] = useState<string | null>(null);
  const [erasing, setErasing] = useState(false);
  const fullName = `${patient.firstName} ${patient.lastName}`;

  const runExport = async () => {
    setExportError(null);
    setProgress(0);
    try {
      await downloadPatientExport(patient.id, setProgress);
    } catch (e) {
      setExportError(e instanceof Error ? e.message : 'The export failed.');
    } finally {
      setTimeout(() => setProgress(null), 1500);
    }
  };

  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Card>
        <CardHeader title="Export all records" />
        <div className="space-y-3 p-5">
          <p className="text-ink-muted">
            One ZIP with every record held about {fullName} as JSON (visits, consents with their evidence, treatments, photos' details, access log) and every stored file: photo
            masters and derivatives, signed consent PDFs, comparison sheets.
          </p>
          {exportError && <Notice tone="danger">{exportError}</Notice>}
          {progress !== null && (
            <div role="progressbar" aria-label="Export progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(progress * 100)} className="h-2 overflow-hidden rounded-full bg-paper-sunk">
              <div className="h-full bg-done transition-[width]" style={{ width: `${Math.round(progress * 100)}%` }} />
            </div>
          )}
          <Button onClick={runExport} busy={progress !== null && progress < 1}>
            <Download className="size-4" /> Download ZIP
          </Button>
        </div>
      </Card>
      <Card>
        <CardHeader title="Erase this patient" />
        <div className="space-y-3 p-5">
          <p className="text-ink-muted">Removes photos, derivatives, documents and records for good. The access log keeps only the fact that the erasure happened.</p>
          <Notice tone="warn">
            Clinical records must usually be kept for years after the last treatment. Twinframe refuses erasure inside the retention period set in Clinic settings; check local law and
            your professional body's guidance before erasing.
          </Notice>
          <Button variant="danger" onClick={() => setErasing(true)}>
            <Trash2 className="size-4" /> Erase patient…
          </Button>
        </div>
      </Card>
      <Dialog open={erasing} onClose={() => setErasing(false)} title="Erase patient">
        <EraseForm patientId={patient.id} fullName={fullName} onCancel={() => setErasing(false)} />
      </Dialog>
    </div>
  );
}

function EraseForm({ patientId, fullName, onCancel }: { patientId: string; fullName: string; onCancel: () => void }) {
  const erase = useErasePatient(patientId);
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [confirmName, setConfirmName] = useState('');
  const [reason, setReason] = useState('');
  const errors = erase.error instanceof ApiError ? erase.error.fieldErrors() : {};
  const submit = (e: FormEvent) => {
    e.preventDefault();
    erase.mutate(
      { confirmName, reason },
      {
        onSuccess: () => {
          qc.clear();
          navigate('/patients', { replace: true });
        },
      },
    );
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <p>
        This permanently erases <strong>{fullName}</strong> and everything stored about them. It cannot be undone.
      </p>
      {erase.error && !errors.confirmName && !errors.reason && <Notice tone="danger">{erase.error.message}</Notice>}
      <Field label={`Type "${fullName}" to confirm`} error={errors.confirmName}>
        {(p) => <Input {...p} value={confirmName} onChange={(e) => setConfirmName(e.target.value)} autoComplete="off" />}
      </Field>
      <Field label="Reason and reference" error={errors.reason} hint="E.g. the date and reference of the patient's request.">
        {(p) => <Textarea {...p} rows={2} value={reason} onChange={(e) => setReason(e.target.value)} />}
      </Field>
      <div className="flex justify-end gap-2">
        <Button variant="ghost" onClick={onCancel}>
          Cancel
        </Button>
        <Button type="submit" variant="danger" busy={erase.isPending} disabled={!confirmName.trim()}>
          Erase permanently
        </Button>
      </div>
    </form>
  );
}
