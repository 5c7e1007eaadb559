import { NotBuiltYet } from '@/components/ui/not-built';

export default function UnitPage() {
  return <NotBuiltYet title="Unit file" purpose="Everything known about one unit: circuits, alarms, readings, refrigerant and findings." />;
}
