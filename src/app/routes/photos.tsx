import { useParams } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { Notice } from '../../components/ui/notice';
import { Spinner } from '../../components/ui/page';
import { CaptureScreen } from '../../features/photos/components/capture-screen';
import { PatientPhotos } from '../../features/photos/components/patient-photos';
import { ShotListsPage } from '../../features/photos/components/shot-lists-page';
import { useVisit, visitKeys } from '../../features/visits/api/visits';
import { VisitHeader } from '../../features/visits/components/visit-header';
import { RequireRole } from '../require-role';
import { usePatientContext } from './patient';

/** The capture screen of one visit, under the visit's heading. */
export function CaptureRoute() {
  const { visitId = '' } = useParams();
  const qc = useQueryClient();
  const { data: visit, isPending, error } = useVisit(visitId);
  return (
    <RequireRole roles={['admin', 'practitioner']}>
      <VisitHeader visitId={visitId} />
      {isPending ? (
        <Spinner label="Loading visit" />
      ) : error || !visit ? (
        <Notice tone="danger">{error?.message ?? 'Visit not found.'}</Notice>
      ) : (
        <CaptureScreen
          visit={{ id: visit.id, patientId: visit.patientId, startsAt: visit.startsAt, shotListId: visit.shotListId, cancelled: visit.status === 'cancelled' }}
          onVisitChanged={() => qc.invalidateQueries({ queryKey: visitKeys.detail(visit.id) })}
        />
      )}
    </RequireRole>
  );
}

export function PatientPhotosTab() {
  const { me, patient } = usePatientContext();
  return me.role === 'coordinator' ? null : <PatientPhotos patientId={patient.id} />;
}

export const ShotListsRoute = () => (
  <RequireRole roles={['admin']}>
    <ShotListsPage />
  </RequireRole>
);
