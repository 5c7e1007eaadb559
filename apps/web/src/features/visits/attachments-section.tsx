import { useRef, useState } from 'react';
import { Camera, Paperclip } from 'lucide-react';
import { onlineManager, useQueryClient } from '@tanstack/react-query';
import type { AttachmentDto, VisitDetail } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { SelectField } from '@/components/ui/field';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { queueWrite, useOutbox } from '@/lib/visit-outbox';
import { AttachmentThumb } from '@/components/attachment-thumb';
import { QueuedThumb } from './queued-thumb';

export function AttachmentsSection({ visit }: { visit: VisitDetail }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const { entries } = useOutbox(visit.id);
  const [kind, setKind] = useState<'photo' | 'nameplate' | 'document'>('photo');
  const camera = useRef<HTMLInputElement>(null);
  const files = useRef<HTMLInputElement>(null);
  const waiting = entries.flatMap((e) => (e.state === 'waiting' && e.write.kind === 'attachment' ? [e.write] : []));

  // Through the outbox: the file is kept on the phone (IndexedDB) and sent in order, once (its client id).
  const send = (file: File, k: typeof kind) =>
    queueWrite(
      qc,
      { kind: 'attachment', visitId: visit.id, id: crypto.randomUUID(), attachKind: k, file, fileName: file.name },
      {
        sent: (r) => notify(`Attached ${(r as { attachment: AttachmentDto }).attachment.displayName}.`),
        stopped: (e) => notify(`Not attached: ${e.problem?.message ?? 'refused'}`, 'alarm'),
      },
    ).then(
      () => {
        if (!onlineManager.isOnline()) notify(`${file.name} kept on this phone; it is sent when the connection is back.`);
      },
      (e: unknown) => notify(`Not attached: ${errorMessage(e)}`, 'alarm'),
    );
  const onPick = (e: React.ChangeEvent<HTMLInputElement>) => {
    const f = e.target.files?.[0];
    e.target.value = '';
    if (!f) return;
    if (f.size > 15 * 1024 * 1024) {
      notify(`${f.name} is larger than 15 MB; take a smaller photo or split the document.`, 'alarm');
      return;
    }
    void send(f, kind === 'document' && f.type.startsWith('image/') ? 'photo' : kind);
  };

  return (
    <Card title="Photos and documents">
      {visit.attachments.length === 0 && waiting.length === 0 ? (
        <p className="mb-3 text-sm text-slate">
          No photos yet. Photograph the nameplate, the wiring and what you found; PDFs (reports, quotes) can be attached too.
        </p>
      ) : (
        <ul className="mb-3 flex flex-wrap gap-3">
          {visit.attachments.map((a) => (
            <li key={a.id}>
              <AttachmentThumb a={a} />
            </li>
          ))}
          {/* Kept on the phone until the connection is back: drawn from the queued bytes. */}
          {waiting.map((w) => (
            <li key={w.id}>
              <QueuedThumb file={w.file} fileName={w.fileName} kind={w.attachKind} />
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
            <Button size="lg" variant="secondary" onClick={() => camera.current?.click()}>
              <Camera className="size-5" aria-hidden="true" /> Take photo
            </Button>
            <Button size="lg" variant="secondary" onClick={() => files.current?.click()}>
              <Paperclip className="size-5" aria-hidden="true" /> Choose file
            </Button>
          </div>
          <input
            ref={camera}
            type="file"
            accept="image/*"
            capture="environment"
            className="sr-only"
            tabIndex={-1}
            aria-hidden="true"
            onChange={onPick}
          />
          <input
            ref={files}
            type="file"
            accept="image/jpeg,image/png,image/webp,image/heic,image/heif,application/pdf"
            className="sr-only"
            aria-label="Photo or PDF file"
            onChange={onPick}
          />
          <p className="text-xs text-slate">JPEG, PNG, WebP, HEIC or PDF, up to 15 MB each.</p>
        </div>
      )}
    </Card>
  );
}
