import { NotBuiltYet } from '@/components/ui/not-built';

export default function TeamPage() {
  return <NotBuiltYet title="Team" purpose="Branches, people, roles, skills, certifications and working hours." />;
}
