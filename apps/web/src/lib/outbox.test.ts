import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { createStore } from 'idb-keyval';
import { ApiError } from './api-client';
import { classify, idbOutboxStore, memoryOutboxStore, Outbox, waitingText, type OutboxWrite } from './outbox';

// The rules checked here are Coilpath's own (in order, exactly once, refusals kept with their
// reason, conflicts told); the HTTP status meanings are RFC 9110 §15 (4xx client error, 5xx server error,
// 408 Request Timeout, 429 from RFC 6585 §4).

const finding = (visitId: string, id: string): OutboxWrite => ({
  kind: 'finding',
  visitId,
  body: { id, causeCode: 'refrigerant_leak', origin: 'wear' },
});
const state = (visitId: string, s: 'en_route' | 'on_site'): OutboxWrite => ({ kind: 'state', visitId, body: { state: s } });
const close = (visitId: string): OutboxWrite => ({ kind: 'close', visitId, body: { outcome: 'resolved' } });

const label = (w: OutboxWrite) => `${w.visitId}:${w.kind}${w.kind === 'state' ? `:${w.body.state}` : ''}`;

/** A server that records what arrived and answers each send by a script (default: accepted). */
function fakeServer() {
  const arrived: string[] = [];
  const script: ((w: OutboxWrite) => unknown)[] = [];
  let online = true;
  return {
    arrived,
    answerNext: (fn: (w: OutboxWrite) => unknown) => script.push(fn),
    setOnline: (v: boolean) => {
      online = v;
    },
    isOnline: () => online,
    send: (w: OutboxWrite) => {
      if (!online) return Promise.reject(new ApiError(0, 'network', 'Coilpath could not reach the server.'));
      const step = script.shift();
      try {
        const answer = step ? step(w) : { ok: true };
        arrived.push(label(w));
        return Promise.resolve(answer);
      } catch (e) {
        return Promise.reject(e);
      }
    },
  };
}

let n = 0;
const ids = () => `e${++n}`;

describe('the outbox', () => {
  it('keeps writes made offline and sends them in the order they were made, once each, when the connection returns', async () => {
    const server = fakeServer();
    server.setOnline(false);
    const box = new Outbox({ store: memoryOutboxStore(), send: server.send, isOnline: server.isOnline, retryDelay: null, newId: ids });
    await box.add(state('v1', 'en_route'));
    await box.add(state('v1', 'on_site'));
    await box.add(finding('v1', 'f1'));
    await box.add(close('v1'));
    await box.flush();
    expect(server.arrived).toEqual([]);
    expect(box.list().map((e) => e.state)).toEqual(['waiting', 'waiting', 'waiting', 'waiting']);
    expect(waitingText(box.list())).toBe('4 changes waiting to send');

    server.setOnline(true);
    await box.flush();
    await box.flush(); // a second call after the queue emptied sends nothing again
    expect(server.arrived).toEqual(['v1:state:en_route', 'v1:state:on_site', 'v1:finding', 'v1:close']);
    expect(box.list()).toEqual([]);
    expect(waitingText(box.list())).toBeNull();
  });

  it('survives a reload: a new outbox on the same store sends what the last one kept', async () => {
    const store = memoryOutboxStore();
    const server = fakeServer();
    server.setOnline(false);
    const first = new Outbox({ store, send: server.send, retryDelay: null, newId: ids });
    await first.add(finding('v1', 'f1'));
    await first.add(finding('v1', 'f2'));
    await first.flush();

    server.setOnline(true);
    const second = new Outbox({ store, send: server.send, retryDelay: null, newId: ids });
    await second.ready();
    expect(second.list().map((e) => (e.write.kind === 'finding' ? e.write.body.id : ''))).toEqual(['f1', 'f2']);
    await second.flush();
    expect(server.arrived).toEqual(['v1:finding', 'v1:finding']);
    expect(await store.read()).toEqual([]);
  });

  it('tries a server error (5xx) and a timeout again, and keeps the order', async () => {
    const server = fakeServer();
    const box = new Outbox({ store: memoryOutboxStore(), send: server.send, retryDelay: null, newId: ids });
    server.answerNext(() => {
      throw new ApiError(503, 'http_error', 'The server answered 503.');
    });
    await box.add(state('v1', 'en_route'));
    await box.add(state('v1', 'on_site'));
    await box.flush();
    expect(server.arrived).toEqual([]);
    expect(box.list()[0]!.problem?.status).toBe(503);
    server.answerNext(() => {
      throw new ApiError(408, 'http_error', 'Timeout.');
    });
    await box.flush();
    expect(box.list()).toHaveLength(2);
    await box.flush();
    expect(server.arrived).toEqual(['v1:state:en_route', 'v1:state:on_site']);
    expect(box.list()).toEqual([]);
  });

  it('stops a refused write (4xx) with the server’s reason; the visit’s later writes wait behind it, other visits go on; discarding lets them go', async () => {
    const server = fakeServer();
    const stopped: string[] = [];
    const box = new Outbox({
      store: memoryOutboxStore(),
      send: server.send,
      retryDelay: null,
      newId: ids,
      onStopped: (e) => stopped.push(e.problem!.message),
    });
    server.setOnline(false);
    await box.add(finding('v1', 'f1'));
    await box.add(close('v1'));
    await box.add(state('v2', 'en_route'));
    await box.flush();
    server.setOnline(true);
    server.answerNext(() => {
      throw new ApiError(400, 'invalid', 'Choose a cause');
    });
    await box.flush();
    expect(server.arrived).toEqual(['v2:state:en_route']);
    expect(box.list().map((e) => [e.write.kind, e.state])).toEqual([
      ['finding', 'failed'],
      ['close', 'waiting'],
    ]);
    expect(stopped).toEqual(['Choose a cause']);
    expect(waitingText(box.list())).toBe('1 change waiting to send, 1 change not accepted by the server');

    await box.flush(); // a refused write is not tried again by itself
    expect(server.arrived).toEqual(['v2:state:en_route']);

    await box.discard(box.list()[0]!.id);
    await box.flush();
    expect(server.arrived).toEqual(['v2:state:en_route', 'v1:close']);
    expect(box.list()).toEqual([]);
  });

  it('tells a conflict (the visit is no longer this technician’s: 404) in words and never sends over it', async () => {
    const server = fakeServer();
    const box = new Outbox({ store: memoryOutboxStore(), send: server.send, retryDelay: null, newId: ids });
    server.setOnline(false);
    await box.add(state('v1', 'en_route'));
    await box.add(state('v1', 'on_site'));
    await box.flush();
    expect(box.list()[0]!.problem?.code).toBe('network'); // tried without a connection: still waiting
    server.setOnline(true);
    server.answerNext(() => {
      throw new ApiError(404, 'not_found', 'No such visit.');
    });
    await box.flush();
    const [first, second] = box.list();
    expect(first!.state).toBe('conflict');
    expect(first!.problem!.message).toMatch(/office moved this visit to another technician or unbooked it/);
    expect(second!.state).toBe('waiting');
    expect(server.arrived).toEqual([]);
    // Tried once more on the technician's word: the server still refuses, nothing after it is sent.
    server.answerNext(() => {
      throw new ApiError(404, 'not_found', 'No such visit.');
    });
    await box.retry(first!.id);
    await box.flush();
    expect(server.arrived).toEqual([]);
    expect(box.list()[0]!.state).toBe('conflict');
  });

  it('counts a close-out as arrived when a retry after a lost answer finds the visit closed', () => {
    const err = new ApiError(409, 'visit_closed', 'This visit is already closed.');
    expect(classify(err, { write: close('v1'), attempts: 1 }).kind).toBe('sent');
    expect(classify(err, { write: close('v1'), attempts: 0 }).kind).toBe('failed');
    expect(classify(err, { write: finding('v1', 'f1'), attempts: 1 }).kind).toBe('failed');
    expect(classify(new ApiError(429, 'rate_limited', 'Slow down.'), { write: close('v1'), attempts: 0 }).kind).toBe('retry');
    expect(classify(new ApiError(500, 'http_error', 'Oops.'), { write: close('v1'), attempts: 0 }).kind).toBe('retry');
    expect(classify(new TypeError('Failed to fetch'), { write: close('v1'), attempts: 0 }).kind).toBe('retry');
    expect(classify(new ApiError(409, 'not_on_site', 'Not on site.'), { write: finding('v1', 'f1'), attempts: 0 }).kind).toBe('failed');
  });

  it('sends a write added while a run is under way in the same run, after the earlier ones', async () => {
    const server = fakeServer();
    const box = new Outbox({ store: memoryOutboxStore(), send: server.send, retryDelay: null, newId: ids });
    let added: Promise<unknown> | undefined;
    server.answerNext(() => {
      added = box.add(finding('v1', 'f2'));
      return { ok: true };
    });
    await box.add(finding('v1', 'f1'));
    await box.flush();
    await added;
    await box.flush();
    expect(server.arrived).toEqual(['v1:finding', 'v1:finding']);
    expect(box.list()).toEqual([]);
  });

  it('loses nothing and sends each entry once when two tabs share the store (each change applies to what the store holds; one send run at a time)', async () => {
    const store = idbOutboxStore(createStore(`outbox-tabs-${Math.random()}`, 'entries'));
    const server = fakeServer();
    server.setOnline(false);
    // The tabs' lock (the browser's Web Locks in the app): one send run at a time.
    let lock: Promise<void> = Promise.resolve();
    const exclusive = (run: () => Promise<void>) => {
      const next = lock.then(run);
      lock = next.catch(() => undefined);
      return next;
    };
    const tabA = new Outbox({ store, send: server.send, isOnline: server.isOnline, retryDelay: null, newId: ids, exclusive });
    const tabB = new Outbox({ store, send: server.send, isOnline: server.isOnline, retryDelay: null, newId: ids, exclusive });
    await Promise.all([tabA.ready(), tabB.ready()]);
    await tabA.add(finding('v1', 'f1'));
    await tabB.add(finding('v1', 'f2')); // tab B never saw f1 in its own list
    expect((await store.read()).map((e) => (e.write.kind === 'finding' ? e.write.body.id : ''))).toEqual(['f1', 'f2']);
    server.setOnline(true);
    await Promise.all([tabA.flush(), tabB.flush()]);
    expect(server.arrived).toEqual(['v1:finding', 'v1:finding']);
    expect(await store.read()).toEqual([]);
  });

  it('keeps its entries in IndexedDB, photos (Blobs) included', async () => {
    const store = idbOutboxStore(createStore(`outbox-test-${Math.random()}`, 'entries'));
    const server = fakeServer();
    server.setOnline(false);
    const box = new Outbox({ store, send: server.send, retryDelay: null, newId: ids });
    await box.add(finding('v1', 'f1'));
    await box.add({
      kind: 'attachment',
      visitId: 'v1',
      id: 'a1',
      attachKind: 'photo',
      file: new Blob(['jpeg bytes'], { type: 'image/jpeg' }),
      fileName: 'coil.jpg',
    });
    const kept = await store.read();
    expect(kept.map((e) => e.write.kind)).toEqual(['finding', 'attachment']);
    const photo = kept[1]!.write;
    expect(photo.kind === 'attachment' && (await photo.file.text())).toBe('jpeg bytes');
  });
});
