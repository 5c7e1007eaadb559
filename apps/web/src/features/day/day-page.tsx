import { NotBuiltYet } from '@/components/ui/not-built';

export default function DayPage() {
  return <NotBuiltYet title="My Day" purpose="Today’s stops in route order, with each unit’s briefing." />;
}
