import { NotBuiltYet } from '@/components/ui/not-built';

export default function VisitPage() {
  return <NotBuiltYet title="Visit" purpose="Readings, findings, refrigerant and photos for one visit, closed with an outcome." />;
}
