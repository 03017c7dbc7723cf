import { useRef } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Navigate, useNavigate } from 'react-router-dom';
import { Spinner } from '../../components/ui/page';
import { useLogout, useMe } from '../../features/auth/api/auth';
import { useReview } from '../../features/compare/api/compare';
import { ReviewScreen } from '../../features/compare/components/review-screen';
import { patientQuery } from '../../features/patients/api/patients';
import { useIdleLogoff } from '../shell';

const leaveFullscreen = () => {
  if (document.fullscreenElement) void document.exitFullscreen().catch(() => undefined);
};

/** Review mode, outside the app shell: no navigation, no other patient, leaving only through the staff password. */
export function ReviewRoute() {
  const me = useMe();
  const review = useReview(!!me.data);
  const active = review.data?.active ? review.data : null;
  // Where leaving review mode goes: back to the comparison it was started from.
  const back = useRef<string | null>(null);
  if (active) back.current = `/patients/${active.patientId}/compare?view=${encodeURIComponent(active.setup.view)}`;
  const patient = useQuery({ ...patientQuery(active?.patientId ?? ''), enabled: !!active });
  const navigate = useNavigate();
  const qc = useQueryClient();
  const logout = useLogout();
  const signedOut = () => {
    leaveFullscreen();
    qc.clear();
    navigate('/sign-in', { replace: true, state: { reason: 'SESSION_ENDED' } });
  };
  // The unattended-tablet rule holds here too: after the idle time the staff session ends and the photos go.
  useIdleLogoff(me.data?.idleMinutes, () => {
    signedOut();
    logout.mutate();
  });

  if (me.isPending || review.isPending) return <Spinner label="Opening review" />;
  if (!me.data) return <Navigate to="/sign-in" replace />;
  if (!active) return <Navigate to={back.current ?? '/'} replace />;
  if (!patient.data) return <div className="min-h-dvh bg-photo-surround-deep" />;
  return (
    <ReviewScreen
      patient={patient.data}
      setup={active.setup}
      onLeft={leaveFullscreen}
      onSignedOut={signedOut}
    />
  );
}
