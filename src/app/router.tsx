import { createBrowserRouter, Navigate } from 'react-router-dom';
import { SignInPage } from '../features/auth/components/sign-in-page';
import { PatientsPage } from '../features/patients/components/patients-page';
import { UsersPage } from '../features/users/components/users-page';
import { ClinicDayPage } from '../features/visits/components/clinic-day';
import { RequireRole, useCurrentUser } from './require-role';
import { PatientLayout, PatientOverview } from './routes/patient';
import { VisitRoute } from './routes/visit';
import { AppShell } from './shell';

function UsersRoute() {
  const me = useCurrentUser();
  return (
    <RequireRole roles={['admin']}>
      <UsersPage currentUserId={me.id} />
    </RequireRole>
  );
}

export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInPage /> },
  {
    element: <AppShell />,
    children: [
      { index: true, element: <ClinicDayPage /> },
      { path: 'patients', element: <PatientsPage /> },
      {
        path: 'patients/:patientId',
        element: <PatientLayout />,
        children: [{ index: true, element: <PatientOverview /> }],
      },
      { path: 'visits/:visitId', element: <VisitRoute /> },
      { path: 'admin/users', element: <UsersRoute /> },
      { path: '*', element: <Navigate to="/" replace /> },
    ],
  },
]);
