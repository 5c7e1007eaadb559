import { fileTypeFromBuffer } from 'file-type';
import { attachmentContentTypes, type AttachmentDto, type AttachmentKind, type SessionUser } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { badRequest, conflict, HttpError, notFound } from '../../lib/errors';
import { readStoredFile } from '../../storage/storage';
import { assertVisitReadable, assertVisitWritable, loadReadableUnit, loadVisit } from './access';
import { attachmentDto } from './visits.present';
import * as repo from './visits.repo';
import { actAs } from '../events/actor';

/** A client's file name made safe to show: no path, no control characters, at most 120 characters. */
export function cleanDisplayName(name: string | undefined, fallback = 'upload'): string {
  const base = (name ?? '').split(/[\\/]/).pop() ?? '';
  const cleaned = base
    .normalize('NFC')
    .replace(/[\u0000-\u001f\u007f<>:"|?*]+/g, '')
    .replace(/\s+/g, ' ')
    .trim()
    .replace(/^\.+/, '');
  return (cleaned || fallback).slice(0, 120);
}

const allowed = new Set<string>(attachmentContentTypes);

/** How an attachment is named in a message (e.g. its file is missing). */
export const attachmentLabel: Record<AttachmentKind, string> = { photo: 'photo', nameplate: 'nameplate photo', document: 'document' };

/**
 * Stores a photo or PDF for a visit (and its unit). The type is decided by the file's content,
 * never by its name or the browser's claim: anything but JPEG, PNG, WebP, HEIC/HEIF or PDF is 415.
 */
export async function addAttachment(
  ctx: AppContext,
  user: SessionUser,
  visitId: string,
  file: { buffer: Buffer; originalname?: string; size: number } | undefined,
  fields: { id?: string | undefined; kind?: AttachmentKind | undefined; unitId?: string | undefined },
): Promise<AttachmentDto> {
  const v = await loadVisit(ctx.db, visitId);
  assertVisitWritable(user, v);
  if (fields.id) {
    // A client-made id seen before answers the stored attachment (a retried upload), never a second copy.
    const existing = await repo.findAttachment(ctx.db, fields.id);
    if (existing) {
      if (existing.visitId !== visitId) throw conflict('id_taken', 'That attachment id belongs to another visit.');
      return attachmentDto(existing);
    }
  }
  if (!file || file.size === 0) {
    throw badRequest('Choose a photo or PDF to attach.', { fields: [{ path: 'file', message: 'No file was sent' }] });
  }
  const detected = await fileTypeFromBuffer(file.buffer);
  if (!detected || !allowed.has(detected.mime)) {
    throw new HttpError(
      415,
      'unsupported_media_type',
      `Only photos (JPEG, PNG, WebP, HEIC) and PDF files can be attached; this file is ${detected ? `${detected.mime}` : 'not one of them'} by its content.`,
    );
  }
  const wo = await repo.workOrderPlace(ctx.db, v.workOrderId);
  const us = await repo.unitsOfWorkOrder(ctx.db, wo!);
  let unitId = fields.unitId ?? null;
  if (unitId && !us.some((u) => u.id === unitId)) {
    throw badRequest('That unit is not on this visit.', { fields: [{ path: 'unitId', message: 'Not a unit of this visit' }] });
  }
  if (!unitId && us.length === 1) unitId = us[0]!.id;
  const kind: AttachmentKind = fields.kind ?? (detected.mime === 'application/pdf' ? 'document' : 'photo');

  const storageKey = await ctx.storage.put(file.buffer, { contentType: detected.mime });
  try {
    const row = await ctx.db.transaction(async (tx) => {
      await actAs(tx, user.id);
      return repo.insertAttachment(tx, {
        ...(fields.id ? { id: fields.id } : {}),
        visitId,
        unitId,
        kind,
        storageKey,
        displayName: cleanDisplayName(file.originalname, kind === 'document' ? 'document.pdf' : 'photo'),
        contentType: detected.mime,
        sizeBytes: file.size,
        uploadedById: user.id,
      });
    });
    return attachmentDto(row);
  } catch (err) {
    await ctx.storage.remove(storageKey).catch(() => undefined);
    throw err;
  }
}

/** An attachment the signed-in person may see: through its visit, else through its unit. */
export async function readAttachment(ctx: AppContext, user: SessionUser, id: string) {
  const a = await repo.findAttachment(ctx.db, id);
  if (!a) throw notFound('attachment');
  let ok = false;
  if (a.visitId) {
    const v = await repo.loadVisit(ctx.db, a.visitId);
    try {
      assertVisitReadable(user, v);
      ok = true;
    } catch {
      ok = false;
    }
  }
  if (!ok && a.unitId) {
    await loadReadableUnit(ctx.db, user, a.unitId).catch(() => {
      throw notFound('attachment');
    });
    ok = true;
  }
  if (!ok) throw notFound('attachment');
  const content = await readStoredFile(ctx.storage, a.storageKey, attachmentLabel[a.kind]);
  return { attachment: a, content };
}
