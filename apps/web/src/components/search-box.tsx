import { Search } from 'lucide-react';
import { useDebouncedSearch } from '@/lib/use-list-params';

/** A list's search field: commits the text after a short pause (Sites, Customers, Team). */
export function SearchBox({ value, onCommit, label }: { value: string; onCommit: (q: string) => void; label: string }) {
  const [text, setText] = useDebouncedSearch(value, onCommit);
  return (
    <label className="relative flex min-w-0 flex-1 items-center sm:max-w-sm">
      <span className="sr-only">{label}</span>
      <Search className="pointer-events-none absolute left-3 size-4 text-slate" aria-hidden="true" />
      <input
        type="search"
        value={text}
        onChange={(e) => setText(e.target.value)}
        placeholder={label}
        className="min-h-11 w-full rounded-md border border-slate-line bg-white py-2 pl-9 pr-3"
      />
    </label>
  );
}
