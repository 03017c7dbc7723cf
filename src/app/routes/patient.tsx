import { NavLink, Outlet, useOutletContext, useParams } from 'react-router-dom';
import { Notice } from '../../components/ui/notice';
import { Spinner } from '../../components/ui/page';
import { cn } from '../../lib/cn';
import type { Me, Role } from '../../features/auth/types';
import { PatientConsents } from '../../features/consents/components/patient-consents';
import { MeasurementsPanel } from '../../features/landmarks/components/measurements-page';
import { usePatient } from '../../features/patients/api/patients';
import { PatientDataPanel } from '../../features/patient-data/components/patient-data-panel';
import { PatientShowcase } from '../../features/showcase/components/patient-showcase';
import { PatientHeader } from '../../features/patients/components/patient-header';
import type { Patient } from '../../features/patients/types';
import { VisitList } from '../../features/visits/components/visit-list';
import { useCurrentUser } from '../require-role';

/** Tabs of the patient page; each lists the roles that see it. */
const TABS: { to: string; label: string; roles: Role[] }[] = [
  { to: '', label: 'Overview', roles: ['admin', 'practitioner', 'coordinator'] },
  { to: 'timeline', label: 'Timeline', roles: ['admin', 'practitioner'] },
  { to: 'photos', label: 'Photos', roles: ['admin', 'practitioner'] },
  { to: 'consents', label: 'Consents', roles: ['admin', 'practitioner', 'coordinator'] },
  { to: 'measurements', label: 'Measurements', roles: ['admin', 'practitioner'] },
  { to: 'showcase', label: 'Showcase', roles: ['admin', 'practitioner'] },
  { to: 'data', label: 'Data rights', roles: ['admin'] },
];

export interface PatientContext {
  me: Me;
  patient: Patient;
}
export const usePatientContext = () => useOutletContext<PatientContext>();

export function PatientLayout() {
  const { patientId = '' } = useParams();
  const me = useCurrentUser();
  const { data: patient, isPending, error } = usePatient(patientId);
  if (isPending) return <Spinner label="Loading patient" />;
  if (error || !patient) return <Notice tone="danger">{error?.message ?? 'Patient not found.'}</Notice>;
  const tabs = TABS.filter((t) => t.roles.includes(me.role));
  return (
    <>
      <PatientHeader patient={patient} />
      {tabs.length > 1 && (
        <nav aria-label="Patient record" className="mb-5 flex gap-1 overflow-x-auto border-b border-line">
          {tabs.map((t) => (
            <NavLink
              key={t.to}
              to={t.to}
              end
              className={({ isActive }) => cn('-mb-px flex min-h-11 shrink-0 items-center border-b-2 border-transparent px-3 font-medium text-ink-muted hover:text-ink', isActive && 'border-accent text-ink')}
            >
              {t.label}
            </NavLink>
          ))}
        </nav>
      )}
      <Outlet context={{ me, patient } satisfies PatientContext} />
    </>
  );
}

export function PatientOverview() {
  const { me, patient } = usePatientContext();
  return <VisitList patientId={patient.id} canWriteNotes={me.role !== 'coordinator'} />;
}

export function PatientConsentsTab() {
  const { patient } = usePatientContext();
  return <PatientConsents patient={patient} />;
}

export function PatientMeasurementsTab() {
  const { me, patient } = usePatientContext();
  return me.role === 'coordinator' ? null : <MeasurementsPanel patientId={patient.id} />;
}

export function PatientDataTab() {
  const { me, patient } = usePatientContext();
  return me.role === 'admin' ? <PatientDataPanel patient={patient} /> : null;
}

export function PatientShowcaseTab() {
  const { me, patient } = usePatientContext();
  return <PatientShowcase patientId={patient.id} isAdmin={me.role === 'admin'} />;
}
