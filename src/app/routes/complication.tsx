import { useParams } from 'react-router-dom';
import { EpisodePage } from '../../features/complications/components/episode-page';
import { RequireRole } from '../require-role';

export function ComplicationRoute() {
  const { complicationId = '' } = useParams();
  return (
    <RequireRole roles={['admin', 'practitioner']}>
      <EpisodePage key={complicationId} id={complicationId} />
    </RequireRole>
  );
}
