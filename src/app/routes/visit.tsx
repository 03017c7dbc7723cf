import { useParams } from 'react-router-dom';
import { VisitOpenItems } from '../../features/consents/components/open-items';
import { VisitHeader } from '../../features/visits/components/visit-header';
import { useCurrentUser } from '../require-role';

export function VisitRoute() {
  const { visitId = '' } = useParams();
  const me = useCurrentUser();
  return (
    <div className="space-y-5">
      <VisitHeader visitId={visitId} />
      <VisitOpenItems visitId={visitId} canReview={me.role !== 'coordinator'} />
    </div>
  );
}
