import { FileText } from 'lucide-react';
import type { AttachmentDto } from '@coilpath/contract';

/** Browsers show JPEG, PNG and WebP; HEIC photos from some phones only download, and the server sends PDFs as downloads. */
const viewable = (a: AttachmentDto) => ['image/jpeg', 'image/png', 'image/webp'].includes(a.contentType);

export function AttachmentThumb({ a }: { a: AttachmentDto }) {
  return (
    <a
      href={a.url}
      {...(viewable(a) ? { target: '_blank', rel: 'noreferrer' } : { download: a.displayName })}
      className="group flex w-28 flex-col gap-1 text-xs"
    >
      {viewable(a) ? (
        <img
          src={a.thumbUrl}
          alt={`${a.kind === 'nameplate' ? 'Nameplate' : 'Photo'}: ${a.displayName}`}
          loading="lazy"
          className="size-28 rounded-md border border-slate-line object-cover"
        />
      ) : (
        <span className="flex size-28 items-center justify-center rounded-md border border-slate-line bg-frost">
          <FileText className="size-8 text-slate" aria-hidden="true" />
        </span>
      )}
      <span className="truncate text-slate group-hover:text-coolant">{a.displayName}</span>
    </a>
  );
}
