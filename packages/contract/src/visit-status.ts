/**
 * A visit's status, its labels and the rule for recording on it: free of zod, for the Route and Visit screens
 * and the outbox (the visit's schemas and answers are in `visits.ts`).
 */

export type VisitStatus = 'booked' | 'en_route' | 'on_site' | 'closed';
export const visitStatusLabels: Record<VisitStatus, string> = {
  booked: 'Booked',
  en_route: 'En route',
  on_site: 'On site',
  closed: 'Closed',
};

/**
 * The rule for recording work on a visit: readings, findings and refrigerant are recorded on a visit
 * that is on site (until it is closed). The API refuses others with 409 and this code and message;
 * the Visit screen shows the same message (`VisitDetail.recordRefusal`) instead of the forms.
 */
export function recordingRefusal(status: VisitStatus): { code: 'not_on_site' | 'visit_closed'; message: string } | null {
  switch (status) {
    case 'on_site':
      return null;
    case 'closed':
      return {
        code: 'visit_closed',
        message: 'This visit is already closed; it takes no more work. Add a return visit if more is needed.',
      };
    case 'en_route':
      return {
        code: 'not_on_site',
        message:
          'This visit is en route, not on site yet. Readings, findings and refrigerant are recorded on site: mark yourself on site first.',
      };
    default:
      return {
        code: 'not_on_site',
        message:
          'This visit is booked, not started. Readings, findings and refrigerant are recorded on site: go en route, then mark yourself on site.',
      };
  }
}
