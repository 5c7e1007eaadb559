import { NotBuiltYet } from '@/components/ui/not-built';

export default function FixQualityPage() {
  return <NotBuiltYet title="Fix Quality" purpose="First-time fix, callbacks and their causes, and what factory defects cost." />;
}
