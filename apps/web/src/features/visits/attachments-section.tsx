import { useRef, useState } from 'react';
import { Camera, FileText, Paperclip } from 'lucide-react';
import type { AttachmentDto, VisitDetail } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { SelectField } from '@/components/ui/field';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { SaveStatus } from './save-status';
import { useUpload } from './visit-api';

/** Browsers show JPEG, PNG and WebP; HEIC photos from some phones only download, and the server sends PDFs as downloads. */
const viewable = (a: AttachmentDto) => ['image/jpeg', 'image/png', 'image/webp'].includes(a.contentType);

export function AttachmentThumb({ a }: { a: AttachmentDto }) {
  return (
    <a href={a.url} {...(viewable(a) ? { target: '_blank', rel: 'noreferrer' } : { download: a.displayName })} className="group flex w-28 flex-col gap-1 text-xs">
      {viewable(a) ? (
        <img src={a.thumbUrl} alt={`${a.kind === 'nameplate' ? 'Nameplate' : 'Photo'}: ${a.displayName}`} loading="lazy" className="size-28 rounded-md border border-slate-line object-cover" />
      ) : (
        <span className="flex size-28 items-center justify-center rounded-md border border-slate-line bg-frost">
          <FileText className="size-8 text-slate" aria-hidden="true" />
        </span>
      )}
      <span className="truncate text-slate group-hover:text-coolant">{a.displayName}</span>
    </a>
  );
}

export function AttachmentsSection({ visit }: { visit: VisitDetail }) {
  const notify = useNotify();
  const upload = useUpload(visit.id);
  const [kind, setKind] = useState<'photo' | 'nameplate' | 'document'>('photo');
  const camera = useRef<HTMLInputElement>(null);
  const files = useRef<HTMLInputElement>(null);
  const [last, setLast] = useState<{ file: File; kind: typeof kind } | null>(null);

  const send = (file: File, k: typeof kind) => {
    setLast({ file, kind: k });
    upload.mutate(
      { file, kind: k },
      {
        onSuccess: (r) => notify(`Attached ${r.attachment.displayName}.`),
        onError: (e) => notify(`Not attached: ${errorMessage(e)}`, 'alarm'),
      },
    );
  };
  const onPick = (e: React.ChangeEvent<HTMLInputElement>) => {
    const f = e.target.files?.[0];
    e.target.value = '';
    if (!f) return;
    if (f.size > 15 * 1024 * 1024) {
      notify(`${f.name} is larger than 15 MB; take a smaller photo or split the document.`, 'alarm');
      return;
    }
    send(f, kind === 'document' && f.type.startsWith('image/') ? 'photo' : kind);
  };

  return (
    <Card title="Photos and documents">
      {visit.attachments.length === 0 ? (
        <p className="mb-3 text-sm text-slate">No photos yet. Photograph the nameplate, the wiring and what you found; PDFs (reports, quotes) can be attached too.</p>
      ) : (
        <ul className="mb-3 flex flex-wrap gap-3">
          {visit.attachments.map((a) => (
            <li key={a.id}>
              <AttachmentThumb a={a} />
            </li>
          ))}
        </ul>
      )}
      {visit.canWrite && (
        <div className="flex flex-col gap-3">
          <div className="max-w-xs">
            <SelectField label="Attach as" value={kind} onChange={(e) => setKind(e.target.value as typeof kind)}>
              <option value="photo">Photo</option>
              <option value="nameplate">Nameplate photo</option>
              <option value="document">Document (PDF)</option>
            </SelectField>
          </div>
          <div className="flex flex-wrap gap-2">
            <Button size="lg" variant="secondary" onClick={() => camera.current?.click()} busy={upload.isPending}>
              <Camera className="size-5" aria-hidden="true" /> Take photo
            </Button>
            <Button size="lg" variant="secondary" onClick={() => files.current?.click()} busy={upload.isPending}>
              <Paperclip className="size-5" aria-hidden="true" /> Choose file
            </Button>
          </div>
          <input ref={camera} type="file" accept="image/*" capture="environment" className="sr-only" tabIndex={-1} aria-hidden="true" onChange={onPick} />
          <input
            ref={files}
            type="file"
            accept="image/jpeg,image/png,image/webp,image/heic,image/heif,application/pdf"
            className="sr-only"
            aria-label="Photo or PDF file"
            onChange={onPick}
          />
          <p className="text-xs text-slate">JPEG, PNG, WebP, HEIC or PDF, up to 15 MB each.</p>
          {(upload.isPending || upload.isError) && (
            <SaveStatus
              pending={upload.isPending}
              failureCount={upload.failureCount}
              paused={upload.isPaused}
              error={upload.error}
              dirty
              onRetry={last ? () => send(last.file, last.kind) : undefined}
            />
          )}
        </div>
      )}
    </Card>
  );
}
