import { NotBuiltYet } from '@/components/ui/not-built';

export default function SitesPage() {
  return <NotBuiltYet title="Sites" purpose="Customers, their sites and units, and equipment import." />;
}
