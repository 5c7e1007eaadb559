import { NotBuiltYet } from '@/components/ui/not-built';

export default function WatchlistPage() {
  return <NotBuiltYet title="Watchlist" purpose="Units that alarm again and again, open leak cases with their deadlines, and return visits to book." />;
}
