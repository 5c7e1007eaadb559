import { useCallback, useState } from 'react';
import { FileText } from 'lucide-react';
import { Badge } from '@/components/ui/page';

/** What a browser draws from the phone's own bytes (HEIC photos and PDFs show as a file). */
const drawable = (type: string) => ['image/jpeg', 'image/png', 'image/webp', 'image/gif'].includes(type);

/**
 * A file waiting in the outbox, drawn from the bytes kept on the phone: an object URL made from the queued
 * Blob while the thumbnail is shown, and released (`URL.revokeObjectURL`) when it goes (sent, refused, or
 * the screen left).
 */
export function QueuedThumb({ file, fileName, kind }: { file: Blob; fileName: string; kind: 'photo' | 'nameplate' | 'document' }) {
  // The first Blob seen: the outbox reads its entries back after each change (a new Blob of the same bytes).
  const [blob] = useState(file);
  const show = useCallback(
    (img: HTMLImageElement | null) => {
      if (!img) return;
      const url = URL.createObjectURL(blob);
      img.src = url;
      return () => URL.revokeObjectURL(url);
    },
    [blob],
  );
  return (
    <div className="flex w-28 flex-col gap-1 text-xs">
      {drawable(blob.type) ? (
        <img
          ref={show}
          alt={`${kind === 'nameplate' ? 'Nameplate' : 'Photo'} waiting to send: ${fileName}`}
          className="size-28 rounded-md border border-slate-line object-cover"
        />
      ) : (
        <span className="flex size-28 items-center justify-center rounded-md border border-slate-line bg-frost">
          <FileText className="size-8 text-slate" aria-hidden="true" />
        </span>
      )}
      <span className="truncate text-slate">{fileName}</span>
      <span>
        <Badge tone="watch">Waiting to send</Badge>
      </span>
    </div>
  );
}
