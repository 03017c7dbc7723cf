import { createBrowserRouter, Navigate } from 'react-router-dom';
import { SignInPage } from '../features/auth/components/sign-in-page';
import { AppShell } from './shell';

/**
 * Routes. The sign-in page and the shell are in the first bundle; every screen behind them is loaded
 * on demand (`lazy`), so the first screen stays small on a tablet.
 */
export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInPage /> },
  // Public, no sign-in: anyone holding a consent PDF checks it here (the address printed in every PDF's footer).
  { path: '/verify', lazy: () => import('../features/verify/components/verify-page').then((m) => ({ Component: m.VerifyPage })) },
  // Outside the shell: a device in hand-over shows only the patient's forms.
  { path: '/handover', lazy: () => import('../features/consents/components/handover-flow').then((m) => ({ Component: m.HandoverFlowPage })) },
  // Outside the shell: review mode shows one patient's comparison full screen, with no way to other records.
  { path: '/review', lazy: () => import('./routes/review').then((m) => ({ Component: m.ReviewRoute })) },
  {
    element: <AppShell />,
    children: [
      { index: true, lazy: () => import('./routes/clinic-day').then((m) => ({ Component: m.ClinicDayRoute })) },
      { path: 'patients', lazy: () => import('../features/patients/components/patients-page').then((m) => ({ Component: m.PatientsPage })) },
      {
        path: 'patients/:patientId',
        lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientLayout })),
        children: [
          { index: true, lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientOverview })) },
          { path: 'consents', lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientConsentsTab })) },
          { path: 'measurements', lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientMeasurementsTab })) },
          { path: 'data', lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientDataTab })) },
          { path: 'showcase', lazy: () => import('./routes/patient').then((m) => ({ Component: m.PatientShowcaseTab })) },
          { path: 'timeline', lazy: () => import('./routes/compare').then((m) => ({ Component: m.PatientTimelineTab })) },
          { path: 'photos', lazy: () => import('./routes/photos').then((m) => ({ Component: m.PatientPhotosTab })) },
        ],
      },
      { path: 'patients/:patientId/compare', lazy: () => import('./routes/compare').then((m) => ({ Component: m.CompareRoute })) },
      { path: 'visits/:visitId', lazy: () => import('./routes/visit').then((m) => ({ Component: m.VisitRoute })) },
      { path: 'visits/:visitId/photos', lazy: () => import('./routes/photos').then((m) => ({ Component: m.CaptureRoute })) },
      { path: 'photos/:photoId/landmarks', lazy: () => import('./routes/photo').then((m) => ({ Component: m.PhotoLandmarksRoute })) },
      { path: 'complications/:complicationId', lazy: () => import('./routes/complication').then((m) => ({ Component: m.ComplicationRoute })) },
      { path: 'stock', lazy: () => import('./routes/stock').then((m) => ({ Component: m.StockRoute })) },
      { path: 'stock/usage', lazy: () => import('./routes/stock').then((m) => ({ Component: m.UsageRoute })) },
      { path: 'admin', lazy: () => import('./routes/admin').then((m) => ({ Component: m.AdminHome })) },
      { path: 'admin/users', lazy: () => import('./routes/admin').then((m) => ({ Component: m.UsersRoute })) },
      { path: 'admin/access-log', lazy: () => import('./routes/admin').then((m) => ({ Component: m.AccessLogRoute })) },
      { path: 'admin/integrity', lazy: () => import('./routes/admin').then((m) => ({ Component: m.IntegrityRoute })) },
      { path: 'admin/settings', lazy: () => import('./routes/admin').then((m) => ({ Component: m.SettingsRoute })) },
      { path: 'admin/showcase', lazy: () => import('./routes/admin').then((m) => ({ Component: m.ShowcaseRoute })) },
      { path: 'admin/products', lazy: () => import('./routes/admin').then((m) => ({ Component: m.ProductsRoute })) },
      { path: 'admin/consent-forms', lazy: () => import('./routes/admin').then((m) => ({ Component: m.ConsentFormsRoute })) },
      { path: 'admin/outbox', lazy: () => import('./routes/admin').then((m) => ({ Component: m.OutboxRoute })) },
      { path: 'admin/shot-lists', lazy: () => import('./routes/photos').then((m) => ({ Component: m.ShotListsRoute })) },
      { path: '*', element: <Navigate to="/" replace /> },
    ],
  },
]);
