import { useParams } from 'react-router-dom';
import { VisitOpenItems } from '../../features/consents/components/open-items';
import { VisitPhotosCard } from '../../features/photos/components/visit-photos-card';
import { ConsultationForm } from '../../features/treatments/components/consultation-form';
import { ScreeningReviewCard } from '../../features/treatments/components/screening-review';
import { VisitComplications } from '../../features/complications/components/visit-complications';
import { EmergencyKitNotice } from '../../features/stock/components/emergency-kit-notice';
import { TreatmentEditor } from '../../features/treatments/components/treatment-editor';
import { useVisit } from '../../features/visits/api/visits';
import { VisitHeader } from '../../features/visits/components/visit-header';
import { useCurrentUser } from '../require-role';

export function VisitRoute() {
  const { visitId = '' } = useParams();
  const me = useCurrentUser();
  const { data: visit } = useVisit(visitId);
  // Screening, consultation and treatment are clinical: the front desk never sees them (the server refuses them too).
  const clinical = me.role !== 'coordinator' && visit && visit.status !== 'cancelled';
  return (
    <div className="space-y-5">
      <VisitHeader visitId={visitId} />
      <VisitOpenItems visitId={visitId} canReview={me.role !== 'coordinator'} />
      {clinical && (
        <>
          <ScreeningReviewCard visitId={visitId} />
          <VisitPhotosCard visitId={visitId} shotListId={visit.shotListId} />
          <ConsultationForm key={`c-${visitId}`} visitId={visitId} patientId={visit.patientId} defaultOpen={visit.kind === 'consultation'} />
          {visit.kind !== 'consultation' && (
            <>
              <EmergencyKitNotice />
              <TreatmentEditor key={`t-${visitId}`} visitId={visitId} patientId={visit.patientId} />
              <VisitComplications visitId={visitId} patientId={visit.patientId} />
            </>
          )}
        </>
      )}
    </div>
  );
}
