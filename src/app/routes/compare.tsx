import { useParams } from 'react-router-dom';
import { Notice } from '../../components/ui/notice';
import { EmptyState, Spinner } from '../../components/ui/page';
import { CompareScreen } from '../../features/compare/components/compare-screen';
import { PatientTimeline } from '../../features/compare/components/patient-timeline';
import { usePatient } from '../../features/patients/api/patients';
import { RequireRole } from '../require-role';
import { usePatientContext } from './patient';

/** The timeline tab of the patient page: clinical photos, so clinicians only (the server refuses the rest anyway). */
export function PatientTimelineTab() {
  const { me, patient } = usePatientContext();
  if (me.role === 'coordinator') return <EmptyState title="Not available for your role">Clinical photos are for practitioners and admins.</EmptyState>;
  return (
    <PatientTimeline
      patientId={patient.id}
      compareHref={(q) => {
        const qs = new URLSearchParams(Object.entries(q).filter((e): e is [string, string] => !!e[1])).toString();
        return `/patients/${patient.id}/compare${qs ? `?${qs}` : ''}`;
      }}
    />
  );
}

/** Compare gets the whole page: the photos are the hero, so the patient header is folded into one line. */
export function CompareRoute() {
  const { patientId = '' } = useParams();
  const { data: patient, isPending, error } = usePatient(patientId);
  return (
    <RequireRole roles={['admin', 'practitioner']}>
      {isPending ? <Spinner label="Loading patient" /> : error || !patient ? <Notice tone="danger">{error?.message ?? 'Patient not found.'}</Notice> : <CompareScreen patient={patient} backTo={`/patients/${patient.id}/timeline`} />}
    </RequireRole>
  );
}
