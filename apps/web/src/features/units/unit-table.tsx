import { useId, type ReactNode } from 'react';

/**
 * The Unit file's tables: a scrolling wrapper, a caption (for screen readers only unless `showCaption`),
 * one header row, and the body's cell styling. `nowrap` keeps each cell on one line (numbers with units).
 * The wrapper is a focusable region named by the caption, so a keyboard can scroll a table wider than the phone.
 */
export function UnitTable({
  caption,
  head,
  children,
  showCaption = false,
  nowrap = false,
}: {
  caption: ReactNode;
  head: string[];
  children: ReactNode;
  showCaption?: boolean;
  nowrap?: boolean;
}) {
  const captionId = useId();
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-labelledby={captionId}>
      <table className="w-full border-collapse text-sm tabular-nums">
        <caption id={captionId} className={showCaption ? 'pb-1 text-left text-xs font-medium text-slate' : 'sr-only'}>
          {caption}
        </caption>
        <thead className="bg-frost text-left text-xs uppercase tracking-wide text-slate">
          <tr>
            {head.map((h) => (
              <th key={h} scope="col" className="whitespace-nowrap border-b border-slate-line px-2 py-2 font-semibold">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody
          className={`${nowrap ? '[&_td]:whitespace-nowrap ' : ''}[&_td]:border-b [&_td]:border-slate-line/60 [&_td]:px-2 [&_td]:py-1.5 [&_td]:align-top`}
        >
          {children}
        </tbody>
      </table>
    </div>
  );
}
