import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { onlineManager } from '@tanstack/react-query';
import { api, ApiError } from './api-client';
import { noteNetworkAnswer, noteNetworkFailure, PROBE_EVERY_MS, stopNetworkProbe } from './online';

describe('offline when a request gets no answer, whatever the browser says', () => {
  beforeEach(() => {
    vi.useFakeTimers();
    onlineManager.setOnline(true);
  });
  afterEach(() => {
    stopNetworkProbe();
    vi.unstubAllGlobals();
    vi.useRealTimers();
    onlineManager.setOnline(true);
  });

  it('a fetch that fails at the network layer counts the app offline (the reopened app shows what it kept)', async () => {
    vi.stubGlobal('fetch', () => Promise.reject(new TypeError('Failed to fetch')));
    await expect(api.get('/api/day')).rejects.toMatchObject({ status: 0, code: 'network' });
    expect(onlineManager.isOnline()).toBe(false);
  });

  it('an answer of any status counts it online again', async () => {
    onlineManager.setOnline(false);
    vi.stubGlobal('fetch', () =>
      Promise.resolve(
        new Response(JSON.stringify({ error: { code: 'not_found', message: 'Gone' } }), {
          status: 404,
          headers: { 'content-type': 'application/json' },
        }),
      ),
    );
    await expect(api.get('/api/visits/x')).rejects.toBeInstanceOf(ApiError);
    expect(onlineManager.isOnline()).toBe(true);
  });

  it('a cancelled request says nothing about the connection', async () => {
    vi.stubGlobal('fetch', () => Promise.reject(new DOMException('The operation was aborted.', 'AbortError')));
    await expect(api.get('/api/day')).rejects.toMatchObject({ name: 'AbortError' });
    expect(onlineManager.isOnline()).toBe(true);
  });

  it('asks the server again every few seconds and comes back online once it answers', async () => {
    const answers = [false, false, true];
    const reachable = vi.fn(() => Promise.resolve(answers.shift() ?? true));
    noteNetworkFailure(reachable);
    expect(onlineManager.isOnline()).toBe(false);
    await vi.advanceTimersByTimeAsync(PROBE_EVERY_MS);
    expect(reachable).toHaveBeenCalledTimes(1);
    expect(onlineManager.isOnline()).toBe(false);
    await vi.advanceTimersByTimeAsync(PROBE_EVERY_MS);
    expect(onlineManager.isOnline()).toBe(false);
    await vi.advanceTimersByTimeAsync(PROBE_EVERY_MS);
    expect(reachable).toHaveBeenCalledTimes(3);
    expect(onlineManager.isOnline()).toBe(true);
    // Once back, no more asking.
    await vi.advanceTimersByTimeAsync(PROBE_EVERY_MS * 3);
    expect(reachable).toHaveBeenCalledTimes(3);
    noteNetworkAnswer();
    expect(onlineManager.isOnline()).toBe(true);
  });
});
