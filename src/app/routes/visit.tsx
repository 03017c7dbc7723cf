import { useParams } from 'react-router-dom';
import { VisitHeader } from '../../features/visits/components/visit-header';

export function VisitRoute() {
  const { visitId = '' } = useParams();
  return <VisitHeader visitId={visitId} />;
}
