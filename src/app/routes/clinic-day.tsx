import { ClinicDayFollowUps, VisitOpenItems } from '../../features/treatments/components/clinic-day-follow-ups';
import { StockAlertsCard } from '../../features/stock/components/stock-alerts';
import { ClinicDayPage } from '../../features/visits/components/clinic-day';

/** The clinic day with each visit's open items, the day's reminders and overdue reviews, and stock to check. */
export function ClinicDayRoute() {
  return <ClinicDayPage visitExtra={(visitId, date) => <VisitOpenItems visitId={visitId} date={date} />} footer={(date) => (
        <>
          <ClinicDayFollowUps date={date} />
          <StockAlertsCard date={date} />
        </>
      )} />;
}
