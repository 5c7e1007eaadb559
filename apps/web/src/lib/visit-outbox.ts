/**
 * The technician's writes through the outbox (./outbox.ts): how each is sent, how it shows in the kept
 * answers before the server has it (the Visit screen and the Route), and the hooks the screens use.
 *
 * Waiting entries are laid over the visit and the route each time those are answered or restored, so a
 * refetch while entries still wait never hides them; a stopped entry (refused, conflict) is no longer laid
 * over: the screens show it apart, with the server's reason.
 */
import { useSyncExternalStore } from 'react';
import { onlineManager, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { recordingRefusal } from '@coilpath/contract/visit-status';
import type {
  AttachmentDto,
  CloseVisit,
  CloseVisitResult,
  DayResponse,
  FindingDto,
  ReadingDto,
  RefrigerantEventResult,
  VisitDetail,
  VisitStatus,
} from '@coilpath/contract';
import { api } from './api-client';
import { idbOutboxStore, memoryOutboxStore, Outbox, type OutboxEntry, type OutboxWrite } from './outbox';
import { appNow } from './now';

/** Sends one write to its API route. */
export function sendWrite(w: OutboxWrite): Promise<unknown> {
  switch (w.kind) {
    case 'state':
      return api.patch<VisitDetail>(`/api/visits/${w.visitId}`, w.body, { check: 'visitDetailSchema' });
    case 'readings':
      return api.post<{ readings: ReadingDto[] }>(`/api/visits/${w.visitId}/readings`, w.body, { check: 'readingsAnswerSchema' });
    case 'finding':
      return api.post<{ finding: FindingDto }>(`/api/visits/${w.visitId}/findings`, w.body, { check: 'findingAnswerSchema' });
    case 'refrigerant':
      return api.post<RefrigerantEventResult>(`/api/units/${w.unitId}/refrigerant-events`, w.body, {
        check: 'refrigerantEventResultSchema',
      });
    case 'attachment': {
      const form = new FormData();
      form.set('id', w.id);
      form.set('kind', w.attachKind);
      form.set('file', w.file, w.fileName);
      return api.upload<{ attachment: AttachmentDto }>(`/api/visits/${w.visitId}/attachments`, form, { check: 'attachmentAnswerSchema' });
    }
    case 'close':
      return api.post<CloseVisitResult>(`/api/visits/${w.visitId}/close`, w.body, { check: 'closeVisitResultSchema' });
  }
}

/** A close-out's sign-off as the visit will show it; the image, still on the phone, as a data URL. */
const signatureOf = (s: CloseVisit['signature'], at: string): VisitDetail['signature'] => {
  if (!s) return null;
  if (s.kind === 'customer_not_available') return { kind: 'customer_not_available', recordedAt: at };
  return { kind: 'signed', signerName: s.signerName.trim(), signedAt: s.signedAt ?? at, imageUrl: `data:image/png;base64,${s.imagePng}` };
};

const statusAfter = (w: OutboxWrite, status: VisitStatus): VisitStatus => {
  if (w.kind === 'close') return 'closed';
  if (w.kind !== 'state' || status === 'closed' || status === 'on_site') return status;
  return w.body.state === 'on_site' || status === 'booked' ? w.body.state : status;
};

/** A visit as it will be once the write arrives (what the screen can know of it before the server answers). */
export function applyToVisit(v: VisitDetail, w: OutboxWrite, at: string): VisitDetail {
  if (w.visitId !== v.id) return v;
  switch (w.kind) {
    case 'state':
    case 'close': {
      const status = statusAfter(w, v.status);
      if (status === v.status) return v;
      const refusal = recordingRefusal(status);
      return {
        ...v,
        status,
        enRouteAt: status === 'en_route' ? (v.enRouteAt ?? at) : v.enRouteAt,
        onSiteAt: status === 'on_site' ? (v.onSiteAt ?? at) : v.onSiteAt,
        closedAt: status === 'closed' ? at : v.closedAt,
        outcome: w.kind === 'close' ? w.body.outcome : v.outcome,
        returnNeeds: w.kind === 'close' ? (w.body.returnNeeds ?? []) : v.returnNeeds,
        signature: w.kind === 'close' ? signatureOf(w.body.signature, at) : v.signature,
        canWrite: v.canWrite && status !== 'closed',
        canRecord: v.canWrite && status === 'on_site',
        recordRefusal: v.canWrite && status !== 'closed' ? (refusal?.message ?? null) : null,
        events: w.kind === 'state' ? [...v.events, { state: w.body.state, at, byUserId: v.techId }] : v.events,
      };
    }
    case 'readings': {
      const circuit = (id: string) => {
        for (const u of v.units) for (const c of u.circuits) if (c.id === id) return { unit: u, circuit: c };
        return null;
      };
      const replaced = new Set(w.body.readings.map((r) => r.circuitId));
      const added: ReadingDto[] = [];
      for (const r of w.body.readings) {
        const found = circuit(r.circuitId);
        if (!found) continue;
        added.push({
          id: `waiting-${r.circuitId}`,
          visitId: v.id,
          unitId: found.unit.id,
          circuitId: r.circuitId,
          circuitNumber: found.circuit.number,
          takenAt: at,
          refrigerant: found.unit.refrigerant,
          suctionPressure: r.suctionPressure ?? null,
          liquidPressure: r.liquidPressure ?? null,
          dischargePressure: r.dischargePressure ?? null,
          suctionLineTemp: r.suctionLineTemp ?? null,
          liquidLineTemp: r.liquidLineTemp ?? null,
          outdoorTemp: r.outdoorTemp ?? null,
          suctionPressureController: r.suctionPressureController ?? null,
          liquidPressureController: r.liquidPressureController ?? null,
          dischargePressureController: r.dischargePressureController ?? null,
          // Computed by the server when it arrives; the screen computes them live from the values meanwhile.
          suctionSaturationTemp: null,
          liquidSaturationTemp: null,
          superheat: null,
          subcooling: null,
          elevationMeters: v.branch.elevationMeters,
          notes: r.notes ?? null,
          units: w.body.units,
        });
      }
      return { ...v, readings: [...v.readings.filter((r) => !replaced.has(r.circuitId)), ...added] };
    }
    case 'finding': {
      if (v.findings.some((f) => f.id === w.body.id)) return v;
      const b = w.body;
      const f: FindingDto = {
        id: b.id,
        visitId: v.id,
        unitId: b.unitId ?? null,
        causeCode: b.causeCode,
        origin: b.origin,
        alarmCode: b.alarmCode ?? null,
        reportedCircuit: b.reportedCircuit ?? null,
        actualCircuit: b.actualCircuit ?? null,
        notes: b.notes ?? null,
        notesAudience: b.notesAudience ?? 'internal',
        createdAt: at,
      };
      return { ...v, findings: [...v.findings, f] };
    }
    case 'refrigerant': {
      if (v.refrigerantEvents.some((e) => e.id === w.body.id)) return v;
      const b = w.body;
      return {
        ...v,
        refrigerantEvents: [
          ...v.refrigerantEvents,
          {
            id: b.id,
            unitId: w.unitId,
            visitId: v.id,
            date: b.date ?? at.slice(0, 10),
            refrigerant: b.refrigerant,
            poundsAdded: b.poundsAdded ?? 0,
            poundsRecovered: b.poundsRecovered ?? 0,
            reason: b.reason,
            cylinderLot: b.cylinderLot ?? null,
            circuit: b.circuit ?? null,
            techId: v.techId,
            createdAt: at,
          },
        ],
      };
    }
    case 'attachment':
      // A photo waiting to send is listed from the outbox itself (its bytes are on the phone, not at a URL).
      return v;
  }
}

/** The route as it will be once the write arrives: a stop's state. */
export function applyToDay(d: DayResponse, w: OutboxWrite, at: string): DayResponse {
  if (w.kind !== 'state' && w.kind !== 'close') return d;
  let changed = false;
  const stops = d.stops.map((s) => {
    if (s.visitId !== w.visitId) return s;
    const status = statusAfter(w, s.status);
    if (status === s.status) return s;
    changed = true;
    return {
      ...s,
      status,
      enRouteAt: status === 'en_route' ? (s.enRouteAt ?? at) : s.enRouteAt,
      onSiteAt: status === 'on_site' ? (s.onSiteAt ?? at) : s.onSiteAt,
      closedAt: status === 'closed' ? at : s.closedAt,
      outcome: w.kind === 'close' ? w.body.outcome : s.outcome,
    };
  });
  return changed ? { ...d, stops } : d;
}

/** What a screen hears of one write it queued, while the page lives. */
export interface WriteReport {
  /** The server accepted it (its answer). */
  sent?(answer: unknown): void;
  /** The server refused it or it conflicts (the outbox panel shows it too). */
  stopped?(entry: OutboxEntry): void;
}

let current: { qc: QueryClient; box: Outbox; reports: Map<string, WriteReport> } | null = null;

const waitingOf = (box: Outbox, visitId?: string) =>
  box.list().filter((e) => e.state === 'waiting' && (!visitId || e.write.visitId === visitId));

/** Lays the waiting entries over the kept visit and route answers. */
function overlay(qc: QueryClient, box: Outbox, only?: readonly unknown[]) {
  const waiting = waitingOf(box);
  if (!waiting.length) return;
  const visitIds = new Set(waiting.map((e) => e.write.visitId));
  for (const q of qc.getQueryCache().findAll({ queryKey: only as unknown[] | undefined })) {
    const [root, id] = q.queryKey;
    const data = q.state.data;
    if (!data) continue;
    if (root === 'visit' && typeof id === 'string' && visitIds.has(id)) {
      const next = waiting.reduce((v, e) => applyToVisit(v, e.write, e.queuedAt), data as VisitDetail);
      // Keeps the time the answer was fetched: the screens say "as of" it.
      if (next !== data) qc.setQueryData(q.queryKey, next, { updatedAt: q.state.dataUpdatedAt });
    } else if (root === 'day') {
      const next = waiting.reduce((d, e) => applyToDay(d, e.write, e.queuedAt), data as DayResponse);
      if (next !== data) qc.setQueryData(q.queryKey, next, { updatedAt: q.state.dataUpdatedAt });
    }
  }
}

/** The outbox of this page, connected to the query client (made on first use). */
export function connectOutbox(qc: QueryClient): Outbox {
  if (current?.qc === qc) return current.box;
  current?.box.stop();
  const reports = new Map<string, WriteReport>();
  const box = new Outbox({
    store: typeof indexedDB === 'undefined' ? memoryOutboxStore() : idbOutboxStore(),
    send: sendWrite,
    isOnline: () => onlineManager.isOnline(),
    now: appNow,
    onSent: (entry, answer) => {
      const w = entry.write;
      if ((w.kind === 'state' || w.kind === 'close') && answer) {
        const v = w.kind === 'close' ? (answer as CloseVisitResult).visit : (answer as VisitDetail);
        const later = waitingOf(box, w.visitId);
        qc.setQueryData(
          ['visit', w.visitId],
          later.reduce((x, e) => applyToVisit(x, e.write, e.queuedAt), v),
        );
      }
      reports.get(entry.id)?.sent?.(answer);
      reports.delete(entry.id);
      // Once nothing of the visit waits, the server's own answers replace what the phone laid over them.
      if (!waitingOf(box, w.visitId).length) {
        void qc.invalidateQueries({ queryKey: ['visit', w.visitId] });
        void qc.invalidateQueries({ queryKey: ['visit', 'current'] });
      }
      if (w.kind === 'refrigerant') void qc.invalidateQueries({ queryKey: ['unit-briefing', w.unitId] });
      if (!waitingOf(box).length) void qc.invalidateQueries({ queryKey: ['day'] });
    },
    onStopped: (entry) => {
      reports.get(entry.id)?.stopped?.(entry);
      reports.delete(entry.id);
      // No longer laid over: show the server's state.
      void qc.invalidateQueries({ queryKey: ['visit', entry.write.visitId] });
      void qc.invalidateQueries({ queryKey: ['day'] });
    },
  });
  current = { qc, box, reports };
  // Answers from the server (not the phone's own writes) get the waiting entries laid over again.
  qc.getQueryCache().subscribe((ev) => {
    if (ev.type !== 'updated' || ev.action.type !== 'success' || ev.action.manual) return;
    const root = ev.query.queryKey[0];
    if (root === 'visit' || root === 'day') queueMicrotask(() => overlay(qc, box, ev.query.queryKey));
  });
  onlineManager.subscribe((online) => {
    if (online) void box.flush();
  });
  void box.ready().then(() => {
    overlay(qc, box);
    void box.flush();
  });
  return box;
}

/** Lays the waiting entries over what the phone restored (after the kept answers are read back). */
export function overlayRestored(qc: QueryClient) {
  if (current?.qc === qc) overlay(qc, current.box);
}

/** The site of a visit as the kept answers name it (the visit, else a stop on a kept route). */
function placeOf(qc: QueryClient, visitId: string): string | undefined {
  const v = qc.getQueryData<VisitDetail>(['visit', visitId]);
  if (v?.site) return v.site.name;
  for (const [, d] of qc.getQueriesData<DayResponse>({ queryKey: ['day'] })) {
    const s = d?.stops.find((x) => x.visitId === visitId);
    if (s) return s.site.name;
  }
  return undefined;
}

/**
 * Keeps a write, shows it on the screens at once, and sends it when it can. Resolves once it is kept on
 * the phone; `report` hears when it arrives or is refused (while this page lives: after a reload the
 * outbox panel still shows a refusal).
 */
export async function queueWrite(qc: QueryClient, write: OutboxWrite, report?: WriteReport): Promise<OutboxEntry> {
  const box = connectOutbox(qc);
  const id = crypto.randomUUID();
  if (report) current!.reports.set(id, report);
  try {
    const entry = await box.add(write, { id, place: placeOf(qc, write.visitId) });
    overlay(qc, box);
    return entry;
  } catch (e) {
    current?.reports.delete(id);
    throw e;
  }
}

const none: readonly OutboxEntry[] = [];

/** The outbox's entries (all, or one visit's), kept current. */
export function useOutbox(visitId?: string): { entries: readonly OutboxEntry[]; outbox: Outbox } {
  const qc = useQueryClient();
  const box = connectOutbox(qc);
  const all = useSyncExternalStore(
    (fn) => box.subscribe(fn),
    () => box.list(),
    () => none,
  );
  return { entries: visitId ? all.filter((e) => e.write.visitId === visitId) : all, outbox: box };
}
