import { ClinicDayFollowUps, VisitOpenItems } from '../../features/treatments/components/clinic-day-follow-ups';
import { ClinicDayPage } from '../../features/visits/components/clinic-day';

/** The clinic day with each visit's open items and the day's reminders and overdue reviews. */
export function ClinicDayRoute() {
  return <ClinicDayPage visitExtra={(visitId, date) => <VisitOpenItems visitId={visitId} date={date} />} footer={(date) => <ClinicDayFollowUps date={date} />} />;
}
