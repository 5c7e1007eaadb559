import { NotBuiltYet } from '@/components/ui/not-built';

export default function AgreementsPage() {
  return <NotBuiltYet title="Agreements" purpose="Maintenance agreements, their visit plans and planned-maintenance completion." />;
}
