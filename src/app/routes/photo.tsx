import { LandmarkEditorPage } from '../../features/landmarks/components/landmark-editor-page';
import { RequireRole } from '../require-role';

export function PhotoLandmarksRoute() {
  return (
    <RequireRole roles={['admin', 'practitioner']}>
      <LandmarkEditorPage />
    </RequireRole>
  );
}
